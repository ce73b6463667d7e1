package org.turnmark.mechanics.solve;

/** The linear solver failed (no convergence, or a matrix that is not positive definite). */
final class LinearSolveException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    private final boolean indefinite;

    LinearSolveException(String message) {
        this(message, false);
    }

    /**
     * @param indefinite true when the failure shows the matrix is not positive definite (a
     *                   non-positive pivot or curvature), as opposed to a lack of convergence
     */
    LinearSolveException(String message, boolean indefinite) {
        super(message);
        this.indefinite = indefinite;
    }

    /** True when the matrix was found not positive definite. */
    boolean indefinite() {
        return indefinite;
    }
}
