package org.turnmark.mechanics.mesh;

/**
 * The label volume cannot be turned into a usable model: empty or disconnected tissue, a floating
 * body, unknown labels, an element size that needs too much memory. A bad-input error (it extends
 * {@link IllegalArgumentException}); the message names the cause and the offending values.
 */
public final class MeshInputException extends IllegalArgumentException {
    private static final long serialVersionUID = 1L;

    public MeshInputException(String message) {
        super(message);
    }
}
