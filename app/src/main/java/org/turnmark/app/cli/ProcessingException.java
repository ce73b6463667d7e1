package org.turnmark.app.cli;

/** The computation ran but failed (non-convergence, folding, no improvement); exit code 1. */
public final class ProcessingException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    public ProcessingException(String message) {
        super(message);
    }

    public ProcessingException(String message, Throwable cause) {
        super(message, cause);
    }
}
