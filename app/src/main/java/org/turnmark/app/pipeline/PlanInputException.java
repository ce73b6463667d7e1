package org.turnmark.app.pipeline;

/**
 * Input that cannot be planned: an unreadable image, labels the model does not know, a lesion
 * outside the breast. An {@link IllegalArgumentException}, so the command line exits with code 2.
 */
public final class PlanInputException extends IllegalArgumentException {
    private static final long serialVersionUID = 1L;

    public PlanInputException(String message) {
        super(message);
    }

    public PlanInputException(String message, Throwable cause) {
        super(message, cause);
    }
}
