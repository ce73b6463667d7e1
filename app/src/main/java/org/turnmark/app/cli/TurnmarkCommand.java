package org.turnmark.app.cli;

import java.io.PrintWriter;

import picocli.CommandLine;
import picocli.CommandLine.Command;

/**
 * The {@code turnmark} launcher: one entry point with a subcommand per job. Exit codes: 0 success,
 * 1 processing failed (for example non-convergence), 2 bad input or usage, 3 internal error.
 */
@Command(name = "turnmark",
        mixinStandardHelpOptions = true,
        versionProvider = TurnmarkCommand.Version.class,
        description = {
            "Predicts where a lesion marked on a prone breast MRI lies supine.",
            "",
            Caution.SHORT},
        subcommands = {CommandLine.HelpCommand.class})
public final class TurnmarkCommand implements Runnable {

    /** Exit code for bad input or usage. */
    public static final int EXIT_BAD_INPUT = 2;
    /** Exit code when processing failed (non-convergence, folding, cannot improve). */
    public static final int EXIT_FAILED = 1;
    /** Exit code for an unexpected internal error. */
    public static final int EXIT_INTERNAL = 3;

    @CommandLine.Spec
    private CommandLine.Model.CommandSpec spec;

    @Override
    public void run() {
        spec.commandLine().usage(spec.commandLine().getOut());
    }

    /** Builds the command line with every subcommand registered and the project's error handling. */
    public static CommandLine build() {
        CommandLine cl = new CommandLine(new TurnmarkCommand());
        Commands.register(cl);
        cl.setExecutionExceptionHandler(new ErrorHandler());
        cl.setParameterExceptionHandler((ex, args) -> {
            PrintWriter err = ex.getCommandLine().getErr();
            err.println("turnmark: " + ex.getMessage());
            err.println("Try '" + ex.getCommandLine().getCommandSpec().qualifiedName() + " --help'.");
            return EXIT_BAD_INPUT;
        });
        return cl;
    }

    /** Process entry point. */
    public static void main(String[] args) {
        String threadsError = ThreadsOption.applyFromArgs(args);
        if (threadsError != null) {
            System.err.println("turnmark: " + threadsError);
            System.exit(EXIT_BAD_INPUT);
        }
        System.exit(build().execute(args));
    }

    /** Reports the version from the jar manifest. */
    static final class Version implements CommandLine.IVersionProvider {
        @Override
        public String[] getVersion() {
            String v = TurnmarkCommand.class.getPackage().getImplementationVersion();
            return new String[] {"turnmark " + (v == null ? "development build" : v)};
        }
    }
}
