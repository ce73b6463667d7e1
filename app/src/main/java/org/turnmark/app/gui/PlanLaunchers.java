package org.turnmark.app.gui;

import java.nio.file.Files;
import java.nio.file.Path;

import org.turnmark.app.export.PlanWriter;
import org.turnmark.app.pipeline.Planner;

/** The plan launchers the GUI can use. */
final class PlanLaunchers {

    /** Share of the progress bar given to writing the output folder (the planner reports the rest). */
    static final double WRITING_FROM = 0.99;

    private PlanLaunchers() {
    }

    /**
     * Runs the planning pipeline ({@link Planner}) and writes its output folder ({@link PlanWriter}),
     * as {@code turnmark plan} does. An existing folder is refused before any work unless overwrite is set.
     */
    static PlanLauncher pipeline() {
        return (c, out, overwrite, progress) -> {
            Path target = out.toAbsolutePath().normalize();
            if (Files.exists(target) && !overwrite) {
                throw new IllegalArgumentException("output folder " + target + " already exists; choose another "
                        + "folder or tick 'Replace an existing output folder'");
            }
            Planner.Outcome o = new Planner().run(c, Planner.Options.DEFAULT, progress);
            progress.checkCancelled();
            PlanWriter.write(o.result(), o.artifacts(), target, overwrite,
                    progress.sub("writing outputs", WRITING_FROM, 1.0));
            return target;
        };
    }
}
