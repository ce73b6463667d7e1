package org.turnmark.app.cli;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.Locale;
import java.util.concurrent.Callable;

import org.turnmark.app.phantom.PhantomCase;
import org.turnmark.app.phantom.PhantomGenerator;
import org.turnmark.app.phantom.PhantomOptions;
import org.turnmark.app.phantom.PhantomWriter;
import org.turnmark.app.phantom.TruthMechanics;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.solve.SolverDivergedException;

import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code turnmark phantom}: generates a synthetic prone/supine case with known truth. */
@Command(name = "phantom",
        header = "Generates a synthetic prone/supine case with known truth.",
        mixinStandardHelpOptions = true,
        description = {
            "Generates a synthetic prone/supine breast MRI case with known truth (invented anatomy):",
            "images, labels, the true prone->supine displacement field, lesion centroids, nipples and",
            "landmark pairs, plus a case.json for 'turnmark plan'.",
            "",
            Caution.SHORT})
final class PhantomCommand implements Callable<Integer> {

    @CommandLine.Spec
    private CommandLine.Model.CommandSpec spec;

    @Option(names = "--seed", required = true, description = "Seed of every random choice (the case is deterministic for it).")
    private long seed;

    @Option(names = "--spacing-mm", defaultValue = "2.0", description = "Isotropic voxel spacing, mm (1-5; default ${DEFAULT-VALUE}).")
    private double spacingMm;

    @Option(names = "--breasts", defaultValue = "1", description = "1 or 2 breasts (default ${DEFAULT-VALUE}).")
    private int breasts;

    @Option(names = "--side", defaultValue = "right", description = "Side of a single breast: right or left (default ${DEFAULT-VALUE}).")
    private String side;

    @Option(names = "--breast-ml", defaultValue = "350", description = "Volume of each breast, ml (100-1500; default ${DEFAULT-VALUE}).")
    private double breastMl;

    @Option(names = "--projection", defaultValue = "0.85", description = "Protrusion relative to half-width (0.5-1.3; default ${DEFAULT-VALUE}).")
    private double projection;

    @Option(names = "--ptosis", defaultValue = "0.3", description = "Droop towards inferior (0-1; default ${DEFAULT-VALUE}).")
    private double ptosis;

    @Option(names = "--lesion-mm", defaultValue = "12", description = "Lesion diameter, mm (5-30; default ${DEFAULT-VALUE}).")
    private double lesionMm;

    @Option(names = "--lesions", defaultValue = "1", description = "Number of lesions (1-4; default ${DEFAULT-VALUE}).")
    private int lesions;

    @Option(names = "--contrast", defaultValue = "t1", description = "t1 (fat bright) or fatsat (fat-suppressed, lesion enhancing; default ${DEFAULT-VALUE}).")
    private String contrast;

    @Option(names = "--snr", defaultValue = "25", description = "Mean breast-tissue signal / noise sigma (3-1000; default ${DEFAULT-VALUE}).")
    private double snr;

    @Option(names = "--element-mm", defaultValue = "5", description = "Element size of the truth model, mm (2-10; default ${DEFAULT-VALUE}).")
    private double elementMm;

    @Option(names = "--truth", defaultValue = "default", description = {
        "Truth conditions: default (deliberately different from the planner's defaults) or priors (one draw",
        "from the planner's default priors, for calibrating its ellipsoids; default ${DEFAULT-VALUE})."})
    private String truth;

    @Option(names = "--field-of-view", defaultValue = "breast", description = {
        "What the images cover: breast (the breasts with a margin of torso) or chest (both sides and the anterior",
        "half of the torso, with sternum, ribs and lungs; default ${DEFAULT-VALUE})."})
    private String fieldOfView;

    @Option(names = "--case-id", description = "Case name for case.json and the README (default: the output folder name).")
    private String caseId;

    @Option(names = "--out", required = true, description = "Output folder (written atomically; must not exist).")
    private Path out;

    @Option(names = "--overwrite", description = "Replace an existing output folder.")
    private boolean overwrite;

    @Option(names = "--quiet", description = "No progress on stderr.")
    private boolean quiet;

    @Option(names = "--threads", description = "Worker threads (default: all cores).")
    private Integer threads;

    @Override
    public Integer call() throws IOException {
        PhantomOptions o;
        try {
            o = new PhantomOptions(seed, spacingMm, breasts, side, breastMl, projection, ptosis, lesionMm, lesions,
                    PhantomOptions.Contrast.parse(contrast), snr, elementMm, PhantomOptions.Truth.parse(truth),
                    PhantomOptions.FieldOfView.parse(fieldOfView));
        } catch (IllegalArgumentException e) {
            throw new UserInputException(e.getMessage(), e);
        }
        PrintWriter err = spec.commandLine().getErr();
        Progress progress = quiet ? Progress.NONE : new StageProgress(err);
        PhantomCase c;
        try {
            c = PhantomGenerator.generate(o, progress);
        } catch (SolverDivergedException e) {
            throw new ProcessingException("the truth finite-element solve did not converge: " + e.getMessage()
                    + "; try another --seed or a larger --element-mm", e);
        } catch (TruthMechanics.PriorDrawNotSolvedException e) {
            throw new ProcessingException(e.getMessage() + "; this seed's draw is too extreme for the truth "
                    + "model: try another --seed", e);
        }
        String id = caseId != null ? caseId : out.toAbsolutePath().normalize().getFileName().toString();
        PhantomWriter.write(c, out, id, commandLine(o, id), overwrite);
        PrintWriter pw = spec.commandLine().getOut();
        pw.printf(Locale.ROOT, "phantom case written to %s (%dx%dx%d voxels of %.2f mm, %.1f s)%n",
                out.toAbsolutePath().normalize(), c.grid().nx(), c.grid().ny(), c.grid().nz(), o.spacingMm(),
                c.seconds());
        pw.println(Caution.SHORT);
        pw.flush();
        return 0;
    }

    private String commandLine(PhantomOptions o, String id) {
        return String.format(Locale.ROOT, "turnmark phantom --seed %d --spacing-mm %s --breasts %d --side %s "
                        + "--breast-ml %s --projection %s --ptosis %s --lesion-mm %s --lesions %d --contrast %s "
                        + "--snr %s --element-mm %s%s%s --case-id %s --out %s",
                o.seed(), num(o.spacingMm()), o.breasts(), o.side(), num(o.breastVolumeMl()), num(o.projection()),
                num(o.ptosis()), num(o.lesionDiameterMm()), o.lesionCount(),
                o.contrast().name().toLowerCase(Locale.ROOT), num(o.snr()), num(o.elementMm()),
                o.truth() == PhantomOptions.Truth.DEFAULT ? "" : " --truth " + o.truth().key(),
                o.fieldOfView() == PhantomOptions.FieldOfView.BREAST ? "" : " --field-of-view " + o.fieldOfView().key(),
                id, id);
    }

    private static String num(double v) {
        return v == Math.rint(v) ? Long.toString((long) v) : Double.toString(v);
    }

    /** Prints one line per stage change and every 10 % on stderr, with the elapsed wall time. */
    private static final class StageProgress implements Progress {
        private final PrintWriter err;
        private final long t0 = System.nanoTime();
        private String stage = "";
        private int tenth = -1;

        StageProgress(PrintWriter err) {
            this.err = err;
        }

        @Override
        public synchronized void update(String s, double fraction) {
            int t = (int) Math.floor(Math.max(0, Math.min(1, fraction)) * 10);
            if (!s.equals(stage) || t != tenth) {
                stage = s;
                tenth = t;
                err.printf(Locale.ROOT, "phantom: %s %3d %% (%.1f s)%n", s, t * 10, (System.nanoTime() - t0) * 1e-9);
                err.flush();
            }
        }
    }
}
