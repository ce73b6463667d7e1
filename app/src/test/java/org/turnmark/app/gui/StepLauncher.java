package org.turnmark.app.gui;

import java.nio.file.Path;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;

import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.geom.Progress;

/**
 * A plan launcher for tests: reports a named stage, then waits (checking cancellation) until released,
 * then writes a plan folder. Records the case it was given.
 */
final class StepLauncher implements PlanLauncher {

    final CountDownLatch started = new CountDownLatch(1);
    final CountDownLatch release = new CountDownLatch(1);
    volatile CaseFile received;
    volatile boolean sawCancel;
    private final Path caseFile;

    StepLauncher(Path caseFile) {
        this.caseFile = caseFile;
    }

    @Override
    public Path run(CaseFile c, Path outputDir, boolean overwrite, Progress progress) throws Exception {
        received = c;
        progress.update("segmentation", 0.25);
        started.countDown();
        while (!release.await(10, TimeUnit.MILLISECONDS)) {
            if (progress.isCancelled()) {
                sawCancel = true;
                progress.checkCancelled();
            }
        }
        progress.update("writing outputs", 1.0);
        return GuiTestData.writePlan(outputDir, caseFile);
    }
}
