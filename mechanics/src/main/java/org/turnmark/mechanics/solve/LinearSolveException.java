package org.turnmark.mechanics.solve;

/** The linear solver failed (no convergence, or a matrix that is not positive definite). */
final class LinearSolveException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    LinearSolveException(String message) {
        super(message);
    }
}
