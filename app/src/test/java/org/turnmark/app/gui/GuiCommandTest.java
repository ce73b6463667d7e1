package org.turnmark.app.gui;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import picocli.CommandLine;

import org.turnmark.app.cli.TurnmarkCommand;

/** {@code turnmark gui} rejects what it cannot open before starting any window (exit code 2). */
class GuiCommandTest {

    @TempDir
    Path dir;

    private int run(StringWriter err, String... args) {
        CommandLine cl = TurnmarkCommand.build();
        cl.setErr(new PrintWriter(err));
        cl.setOut(new PrintWriter(new StringWriter()));
        return cl.execute(args);
    }

    @Test
    void aMissingFileIsBadInput() {
        StringWriter err = new StringWriter();
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, run(err, "gui", dir.resolve("nope.json").toString()));
        assertTrue(err.toString().contains("no such case file or plan folder"), err.toString());
    }

    @Test
    void aFolderWithoutPlanJsonIsBadInput() throws Exception {
        Path empty = Files.createDirectories(dir.resolve("empty"));
        StringWriter err = new StringWriter();
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, run(err, "gui", empty.toString()));
        assertTrue(err.toString().contains("without plan.json"), err.toString());
    }
}
