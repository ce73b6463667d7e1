package org.turnmark.app.pipeline;

/**
 * The computation ran but could not produce a trustworthy result (a solve that does not converge, a
 * reference state that does not settle); the command line exits with code 1.
 */
public final class PlanFailedException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    public PlanFailedException(String message, Throwable cause) {
        super(message, cause);
    }
}
