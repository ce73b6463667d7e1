package org.turnmark.app.cli;

import java.io.PrintWriter;
import java.io.UncheckedIOException;
import java.nio.file.NoSuchFileException;

import picocli.CommandLine;

/**
 * Turns exceptions escaping a subcommand into a one-line message on stderr and an exit code: bad
 * input ({@link IllegalArgumentException}, I/O problems, {@link UserInputException}) → 2, failed
 * processing ({@link ProcessingException}) → 1, anything else → 3 with the stack trace only when
 * {@code TURNMARK_DEBUG} is set.
 */
final class ErrorHandler implements CommandLine.IExecutionExceptionHandler {

    @Override
    public int handleExecutionException(Exception ex, CommandLine cl, CommandLine.ParseResult parseResult) {
        PrintWriter err = cl.getErr();
        Throwable t = ex;
        if (t instanceof UncheckedIOException && t.getCause() != null) {
            t = t.getCause();
        }
        int code;
        String msg;
        if (t instanceof ProcessingException) {
            code = TurnmarkCommand.EXIT_FAILED;
            msg = t.getMessage();
        } else if (t instanceof NoSuchFileException) {
            code = TurnmarkCommand.EXIT_BAD_INPUT;
            msg = "file not found: " + t.getMessage();
        } else if (t instanceof IllegalArgumentException || t instanceof java.io.IOException
                || t instanceof UserInputException) {
            code = TurnmarkCommand.EXIT_BAD_INPUT;
            msg = t.getMessage();
        } else {
            code = TurnmarkCommand.EXIT_INTERNAL;
            msg = "internal error: " + t;
        }
        err.println("turnmark " + cl.getCommandName() + ": " + (msg == null ? t.getClass().getSimpleName() : msg));
        if (System.getenv("TURNMARK_DEBUG") != null) {
            t.printStackTrace(err); // NOPMD: explicit debug mode
        }
        err.flush();
        return code;
    }
}
