package org.turnmark.mechanics.element;

/** An element whose Jacobian determinant is not positive (degenerate, inverted or folded). */
public final class InvertedElementException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    private final int element;
    private final double detJ;

    /**
     * @param element element index
     * @param detJ    the offending determinant
     * @param what    what was inverted, e.g. "reference element is degenerate"
     */
    public InvertedElementException(int element, double detJ, String what) {
        super(what + ": element " + element + " has det J = " + detJ + " (expected > 0)");
        this.element = element;
        this.detJ = detJ;
    }

    /** Index of the element. */
    public int element() {
        return element;
    }

    /** The non-positive determinant. */
    public double detJ() {
        return detJ;
    }
}
