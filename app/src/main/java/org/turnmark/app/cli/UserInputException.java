package org.turnmark.app.cli;

/** Bad input detected by a command (exit code 2); the message is shown as one line. */
public final class UserInputException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    public UserInputException(String message) {
        super(message);
    }

    public UserInputException(String message, Throwable cause) {
        super(message, cause);
    }
}
