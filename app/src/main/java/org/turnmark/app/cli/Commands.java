package org.turnmark.app.cli;

import picocli.CommandLine;

/** The registry of subcommands, in the order {@code --help} lists them. */
final class Commands {

    private Commands() {
    }

    static void register(CommandLine cl) {
        // Each subcommand is added here as it is built.
        cl.addSubcommand(new PlanCommand());
        cl.addSubcommand(new InspectCommand());
        cl.addSubcommand(new PhantomCommand());
        cl.addSubcommand(new RegisterCommand());
        cl.addSubcommand(new SimulateCommand());
        cl.addSubcommand(new GuiCommand());
    }
}
