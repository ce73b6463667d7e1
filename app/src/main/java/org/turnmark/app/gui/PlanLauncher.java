package org.turnmark.app.gui;

import java.nio.file.Path;

import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.geom.Progress;

/**
 * Runs a plan for the GUI: the case as edited on screen, the output folder, and the progress sink
 * (which also carries cancellation). Runs on a background thread.
 */
@FunctionalInterface
public interface PlanLauncher {

    /**
     * @param caseFile  the normalised case to plan (absolute paths)
     * @param outputDir output folder to create
     * @param overwrite replace an existing output folder
     * @param progress  stage reports and cancellation
     * @return the output folder actually written (holding {@code plan.json})
     * @throws Exception any failure; {@link Progress.CancelledException} when cancelled
     */
    Path run(CaseFile caseFile, Path outputDir, boolean overwrite, Progress progress) throws Exception;
}
