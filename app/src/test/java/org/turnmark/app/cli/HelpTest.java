package org.turnmark.app.cli;

import static org.junit.jupiter.api.Assertions.assertDoesNotThrow;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.util.Locale;
import java.util.Map;

import org.junit.jupiter.api.Test;

import picocli.CommandLine;

/** Every command answers --help (README: "Every command has --help") with a well-formed text. */
class HelpTest {

    @Test
    void everySubcommandPrintsItsUsageForHelp() {
        Map<String, CommandLine> subs = TurnmarkCommand.build().getSubcommands();
        assertTrue(subs.size() >= 6, "subcommands: " + subs.keySet());
        for (String name : subs.keySet()) {
            StringWriter out = new StringWriter();
            StringWriter err = new StringWriter();
            CommandLine cl = TurnmarkCommand.build();
            cl.setOut(new PrintWriter(out, true));
            cl.setErr(new PrintWriter(err, true));
            int code = cl.execute(name, "--help");
            assertEquals(0, code, name + " --help: " + err);
            assertTrue(out.toString().contains("Usage: turnmark " + name), name + ": " + out);
            assertFalse(out.toString().contains("%n"), name + ": an unformatted help text");
        }
    }

    @Test
    void everyHelpLineIsAValidFormatString() {
        // picocli passes description lines through String.format: a bare '%' breaks the whole text
        for (CommandLine sub : TurnmarkCommand.build().getSubcommands().values()) {
            CommandLine.Model.CommandSpec spec = sub.getCommandSpec();
            assertTrue(spec.usageMessage().header().length == 1, spec.name() + ": a one-line header for the command list");
            for (String line : spec.usageMessage().description()) {
                assertDoesNotThrow(() -> String.format(Locale.ROOT, line), spec.name() + ": " + line);
            }
            for (CommandLine.Model.OptionSpec o : spec.options()) {
                for (String line : o.description()) {
                    assertDoesNotThrow(() -> String.format(Locale.ROOT, line), spec.name() + " " + o.longestName()
                            + ": " + line);
                }
            }
        }
    }
}
