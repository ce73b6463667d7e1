package org.turnmark.app.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import picocli.CommandLine;

/** The phantom command's field-of-view option: a bad value is a clear input error, nothing written. */
class PhantomCommandTest {

    @Test
    void anUnknownFieldOfViewIsRefusedWithExitCode2AndNoFolder(@TempDir Path dir) {
        StringWriter err = new StringWriter();
        CommandLine cl = TurnmarkCommand.build();
        cl.setOut(new PrintWriter(new StringWriter(), true));
        cl.setErr(new PrintWriter(err, true));
        Path out = dir.resolve("case");
        int code = cl.execute("phantom", "--seed", "1", "--field-of-view", "torso", "--quiet", "--out", out.toString());
        assertEquals(2, code, err.toString());
        assertTrue(err.toString().contains("field of view must be breast or chest, got 'torso'"), err.toString());
        assertFalse(Files.exists(out), "nothing written for bad input");
    }
}
