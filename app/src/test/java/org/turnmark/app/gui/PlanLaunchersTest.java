package org.turnmark.app.gui;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.app.pipeline.CaseFileReader;
import org.turnmark.geom.Progress;

/** The GUI's launcher of the real planner: the cheap paths (refusal and cancellation before work). */
class PlanLaunchersTest {

    @TempDir
    Path dir;

    @Test
    void anExistingOutputFolderIsRefusedBeforeAnyWorkUnlessReplacing() throws Exception {
        CaseFile c = new CaseFileReader().read(GuiTestData.writeCase(dir));
        Path out = Files.createDirectories(dir.resolve("existing"));
        boolean[] reported = {false};
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> PlanLaunchers.pipeline().run(c, out, false, (stage, f) -> reported[0] = true));
        assertTrue(e.getMessage().contains("Replace an existing output folder"), e.getMessage());
        assertFalse(reported[0], "no stage started");
    }

    @Test
    void aCancelledRunStopsThroughProgressAndWritesNothing() throws Exception {
        CaseFile c = new CaseFileReader().read(GuiTestData.writeCase(dir));
        Path out = dir.resolve("new-plan");
        Progress cancelled = new Progress() {
            @Override
            public void update(String stage, double fraction) {
            }

            @Override
            public boolean isCancelled() {
                return true;
            }
        };
        assertThrows(Progress.CancelledException.class, () -> PlanLaunchers.pipeline().run(c, out, false, cancelled));
        assertFalse(Files.exists(out));
    }
}
