package org.turnmark.app.cli;

import java.io.IOException;
import java.io.PrintStream;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.Callable;

import org.turnmark.app.export.OutputFolder;
import org.turnmark.geom.Parallel;
import org.turnmark.geom.Progress;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.diffeo.DiffeomorphicRegistration;
import org.turnmark.registration.diffeo.LevelReport;
import org.turnmark.registration.diffeo.PreAlignment;
import org.turnmark.registration.diffeo.RegistrationConfig;
import org.turnmark.registration.diffeo.RegistrationInput;
import org.turnmark.registration.diffeo.RegistrationResult;
import org.turnmark.registration.metric.LnccWindow;
import org.turnmark.registration.metric.MetricKind;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.transform.DisplacementFields;
import org.turnmark.registration.transform.JacobianStats;
import org.turnmark.registration.transform.Jacobians;
import org.turnmark.registration.transform.UpdateRule;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;

import me.tongfei.progressbar.ConsoleProgressBarConsumer;
import me.tongfei.progressbar.ProgressBar;
import me.tongfei.progressbar.ProgressBarBuilder;
import me.tongfei.progressbar.ProgressBarStyle;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code turnmark register}: multi-resolution diffeomorphic registration of a moving image to a fixed
 * image, optionally refining an initial displacement field. Writes, atomically into {@code --out}:
 * {@code displacement.nii.gz} (intent 1006, fixed grid, x + u(x) is the moving point of fixed point x,
 * RAS mm) with {@code displacement.json} stating that convention, {@code warped.nii.gz} (moving
 * resampled on the fixed grid), {@code jacobian.nii.gz} (det J of x ↦ x + u(x)) and
 * {@code summary.json}.
 */
@Command(name = "register",
        header = "Registers two images (diffeomorphic, multi-resolution).",
        mixinStandardHelpOptions = true,
        description = {
            "Registers a moving image to a fixed image with a diffeomorphic (stationary velocity field)",
            "demons-style optimisation over a multi-resolution pyramid; with --initial it refines a given",
            "displacement field (for example a mechanics prediction) and keeps the result invertible",
            "relative to it. The output displacement u is on the fixed grid: x + u(x) is the moving-image",
            "point for fixed-image point x (RAS+, mm).",
            "",
            Caution.SHORT})
final class RegisterCommand implements Callable<Integer> {

    /** Intent name written into displacement.nii.gz (≤ 15 ASCII characters). */
    static final String INTENT_NAME = "fixed->moving";

    @CommandLine.Spec
    private CommandLine.Model.CommandSpec spec;

    @Option(names = "--fixed", required = true, description = "Fixed (reference) image, NIfTI; the result lives on its grid.")
    private Path fixed;

    @Option(names = "--moving", required = true, description = "Moving image, NIfTI (any grid; sampled through world coordinates).")
    private Path moving;

    @Option(names = "--fixed-mask", description = "Tissue mask on the fixed grid (voxels > 0.5 are inside).")
    private Path fixedMask;

    @Option(names = "--moving-mask", description = "Tissue mask on the moving grid (voxels > 0.5 are inside).")
    private Path movingMask;

    @Option(names = "--initial", description = "Initial displacement field (intent 1006, same convention as the output) on the fixed grid.")
    private Path initial;

    @Option(names = "--resample-initial", description = "Resample an --initial field given on another grid onto the fixed grid (trilinear) instead of rejecting it.")
    private boolean resampleInitial;

    @Option(names = "--metric", defaultValue = "lncc", description = "Similarity: ssd, lncc or mi (default ${DEFAULT-VALUE}).")
    private String metric;

    @Option(names = "--iterations", split = ",", description = "Iterations per level, coarsest first; the count sets the number of levels (default 60,40,20).")
    private int[] iterations;

    @Option(names = "--fluid-sigma-mm", description = "Gaussian width of the update smoothing at the finest level, mm (default 2.0).")
    private Double fluidSigmaMm;

    @Option(names = "--diffusion-sigma-mm", description = "Gaussian width of the velocity smoothing at the finest level, mm (default 1.5).")
    private Double diffusionSigmaMm;

    @Option(names = "--fluid-weight", description = "Weight of the smoothed update, 0-1 (default 1).")
    private Double fluidWeight;

    @Option(names = "--diffusion-weight", description = "Weight of the smoothed velocity, 0-1 (default 1).")
    private Double diffusionWeight;

    @Option(names = "--max-step-mm", description = "Longest update vector at the finest level, mm (default 1.0).")
    private Double maxStepMm;

    @Option(names = "--update", defaultValue = "bch", description = "Update composition: bch or add (default ${DEFAULT-VALUE}).")
    private String update;

    @Option(names = "--lncc-radius-mm", description = "LNCC window half-width, mm (default 4).")
    private Double lnccRadiusMm;

    @Option(names = "--lncc-window", defaultValue = "box", description = "LNCC window weights: box or gaussian (default ${DEFAULT-VALUE}).")
    private String lnccWindow;

    @Option(names = "--mi-bins", description = "Mutual-information histogram bins (default 32).")
    private Integer miBins;

    @Option(names = "--pre-align", defaultValue = "none", description = "Global alignment first: none, translation, rigid or affine (default ${DEFAULT-VALUE}).")
    private String preAlign;

    @Option(names = "--symmetric", description = "Symmetric (inverse-consistent) forces: forward and backward updates averaged.")
    private boolean symmetric;

    @Option(names = "--out", required = true, description = "Output folder (written atomically).")
    private Path out;

    @Option(names = "--overwrite", description = "Replace an existing output folder.")
    private boolean overwrite;

    @Option(names = "--quiet", description = "No progress bar on stderr.")
    private boolean quiet;

    @Option(names = "--threads", description = "Worker threads (default: all cores).")
    private Integer threads;

    @Override
    public Integer call() throws IOException {
        // Refuse an existing output before the (long) registration rather than after it.
        if (Files.exists(out) && !overwrite) {
            throw new OutputFolder.ExistsException(out.toAbsolutePath().normalize());
        }
        RegistrationConfig cfg = config();
        NiftiReader reader = new NiftiReader();
        Volume f = reader.readVolume(fixed).volume();
        Volume m = reader.readVolume(moving).volume();
        Volume fm = fixedMask == null ? null : reader.readVolume(fixedMask).volume();
        Volume mm = movingMask == null ? null : reader.readVolume(movingMask).volume();
        VectorField init = null;
        if (initial != null) {
            init = reader.readVectorField(initial).field();
            if (!init.grid().sameGrid(f.grid(), DisplacementFields.GRID_TOLERANCE_MM)) {
                if (!resampleInitial) {
                    throw new UserInputException("--initial " + initial + " is on grid " + init.grid()
                            + " but the fixed image " + fixed + " is on " + f.grid()
                            + "; pass --resample-initial to resample it onto the fixed grid");
                }
                DisplacementFields.requireFinite(init, String.valueOf(initial));
                init = DisplacementFields.resample(init, f.grid());
            }
        }
        RegistrationInput in = new RegistrationInput(f, m, fm, mm, init, fileName(fixed), fileName(moving));
        PrintWriter err = spec.commandLine().getErr();
        RegistrationResult r;
        ProgressBar bar = quiet ? null : new ProgressBarBuilder().setTaskName("register").setInitialMax(1000)
                .setStyle(ProgressBarStyle.ASCII).setConsumer(new ConsoleProgressBarConsumer(stderr())).build();
        try {
            r = new DiffeomorphicRegistration(cfg).register(in, bar == null ? Progress.NONE : new BarProgress(bar));
        } finally {
            if (bar != null) {
                bar.close();
            }
        }
        if (!r.improved()) {
            throw new ProcessingException(String.format(Locale.ROOT,
                    "registration could not improve the %s similarity of the starting map (cost %.6g before, no "
                            + "field found below it); nothing written to %s", cfg.metric(), r.costInitial(), out));
        }
        Volume warped = DisplacementFields.warp(m, r.displacement());
        Volume jac = Jacobians.determinant(r.displacement());
        try (OutputFolder folder = OutputFolder.create(out, overwrite)) {
            NiftiWriter.writeDisplacementField(folder.resolve("displacement.nii.gz"), r.displacement(), INTENT_NAME);
            writeJson(folder.resolve("displacement.json"), sidecar());
            NiftiWriter.writeVolume(folder.resolve("warped.nii.gz"), warped);
            NiftiWriter.writeVolume(folder.resolve("jacobian.nii.gz"), jac);
            writeJson(folder.resolve("summary.json"), summary(cfg, r));
            folder.commit();
        }
        PrintWriter pw = spec.commandLine().getOut();
        JacobianStats js = r.jacobian();
        pw.printf(Locale.ROOT, "registered %s to %s: %s cost %.6g -> %.6g, %d iterations, min det J %.3f, "
                        + "%.3f %% voxels det J <= 0, %.1f s; written to %s%n", fileName(moving), fileName(fixed),
                cfg.metric(), r.costInitial(), r.costFinal(), r.totalIterations(), js.minDet(),
                js.percentNonPositive(), r.seconds(), out.toAbsolutePath().normalize());
        if (!js.foldFree()) {
            err.printf(Locale.ROOT, "warning: the total map folds (min det J %.3f); inspect jacobian.nii.gz%n",
                    js.minDet());
        }
        pw.println(Caution.SHORT);
        pw.flush();
        err.flush();
        return 0;
    }

    private static PrintStream stderr() {
        return System.err;
    }

    private RegistrationConfig config() {
        try {
            RegistrationConfig d = RegistrationConfig.defaults();
            return new RegistrationConfig(parse(MetricKind.class, metric, "--metric"),
                    iterations == null ? d.iterations() : iterations,
                    fluidSigmaMm == null ? d.fluidSigmaMm() : fluidSigmaMm,
                    diffusionSigmaMm == null ? d.diffusionSigmaMm() : diffusionSigmaMm,
                    fluidWeight == null ? d.fluidWeight() : fluidWeight,
                    diffusionWeight == null ? d.diffusionWeight() : diffusionWeight,
                    maxStepMm == null ? d.maxStepMm() : maxStepMm,
                    "add".equalsIgnoreCase(update) ? UpdateRule.ADDITION : parse(UpdateRule.class, update, "--update"),
                    lnccRadiusMm == null ? d.lnccRadiusMm() : lnccRadiusMm,
                    parse(LnccWindow.class, lnccWindow, "--lncc-window"),
                    miBins == null ? d.miBins() : miBins, d.convergenceWindow(), d.convergenceTolerance(),
                    parse(PreAlignment.class, preAlign, "--pre-align"), symmetric);
        } catch (IllegalArgumentException e) {
            throw new UserInputException(e.getMessage(), e);
        }
    }

    private static <E extends Enum<E>> E parse(Class<E> type, String value, String option) {
        for (E e : type.getEnumConstants()) {
            if (e.name().equalsIgnoreCase(value)) {
                return e;
            }
        }
        List<String> names = new ArrayList<>();
        for (E e : type.getEnumConstants()) {
            names.add(e.name().toLowerCase(Locale.ROOT));
        }
        throw new IllegalArgumentException(option + " must be one of " + names + ", got '" + value + "'");
    }

    private static String fileName(Path p) {
        return String.valueOf(p.getFileName());
    }

    private Map<String, Object> sidecar() {
        Map<String, Object> s = new LinkedHashMap<>();
        s.put("caution", ResearchUse.FULL);
        s.put("file", "displacement.nii.gz");
        s.put("intent_code", 1006);
        s.put("intent_name", INTENT_NAME);
        s.put("convention", "u is sampled on the fixed image grid; for a fixed-image point x (RAS+ world, mm) "
                + "the corresponding moving-image point is x + u(x)");
        s.put("components", "RAS+ world x, y, z in millimetres, stored as three planes (x, then y, then z)");
        s.put("fixed", fixed.toString());
        s.put("moving", moving.toString());
        s.put("initial", initial == null ? null : initial.toString());
        s.put("composition", "total = pre-alignment affine ∘ initial ∘ exp(v)");
        return s;
    }

    private Map<String, Object> summary(RegistrationConfig cfg, RegistrationResult r) {
        Map<String, Object> s = new LinkedHashMap<>();
        s.put("caution", ResearchUse.FULL);
        s.put("fixed", fixed.toString());
        s.put("moving", moving.toString());
        s.put("fixed_mask", fixedMask == null ? null : fixedMask.toString());
        s.put("moving_mask", movingMask == null ? null : movingMask.toString());
        s.put("initial", initial == null ? null : initial.toString());
        s.put("metric", cfg.metric().name().toLowerCase(Locale.ROOT));
        s.put("cost_note", "costs are minimised: ssd = mean squared difference (intensity^2), lncc = minus mean "
                + "local correlation, mi = minus mutual information (nats)");
        Map<String, Object> c = new LinkedHashMap<>();
        c.put("iterations_per_level_coarse_to_fine", cfg.iterations());
        c.put("fluid_sigma_mm", cfg.fluidSigmaMm());
        c.put("diffusion_sigma_mm", cfg.diffusionSigmaMm());
        c.put("fluid_weight", cfg.fluidWeight());
        c.put("diffusion_weight", cfg.diffusionWeight());
        c.put("max_step_mm", cfg.maxStepMm());
        c.put("update_rule", cfg.updateRule().name().toLowerCase(Locale.ROOT));
        c.put("lncc_radius_mm", cfg.lnccRadiusMm());
        c.put("lncc_window", cfg.lnccWindow().name().toLowerCase(Locale.ROOT));
        c.put("mi_bins", cfg.miBins());
        c.put("pre_alignment", cfg.preAlignment().name().toLowerCase(Locale.ROOT));
        c.put("symmetric", cfg.symmetric());
        s.put("config", c);
        s.put("cost_initial", r.costInitial());
        s.put("cost_final", r.costFinal());
        s.put("improved", r.improved());
        List<Map<String, Object>> levels = new ArrayList<>();
        for (LevelReport l : r.levels()) {
            Map<String, Object> lm = new LinkedHashMap<>();
            lm.put("level", l.level());
            lm.put("grid", new int[] {l.nx(), l.ny(), l.nz()});
            lm.put("spacing_mm", l.spacingMm());
            lm.put("cost_before", l.costBefore());
            lm.put("cost_after", l.costAfter());
            lm.put("iterations", l.iterations());
            lm.put("cost_increases", l.costIncreases());
            lm.put("stop_reason", l.stopReason().name().toLowerCase(Locale.ROOT));
            lm.put("seconds", l.seconds());
            levels.add(lm);
        }
        s.put("levels_coarse_to_fine", levels);
        s.put("pre_alignment_affine_row_major", r.preAlignment().toRowMajor());
        s.put("jacobian_total_in_fixed_mask", jacobian(r.jacobian()));
        s.put("jacobian_residual_in_fixed_mask", jacobian(r.residualJacobian()));
        s.put("seconds", r.seconds());
        s.put("threads", Parallel.threads());
        return s;
    }

    private static Map<String, Object> jacobian(JacobianStats j) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("voxels", j.voxels());
        m.put("min_det", j.minDet());
        m.put("max_det", j.maxDet());
        m.put("percent_det_le_0", j.percentNonPositive());
        m.put("mean_log_det", j.meanLogDet());
        m.put("sd_log_det", j.sdLogDet());
        return m;
    }

    private static void writeJson(Path p, Map<String, Object> map) throws IOException {
        byte[] bytes = new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT).writeValueAsBytes(map);
        Files.write(p, bytes);
    }

    /** Maps the registration's [0, 1] progress onto a 1000-step bar; thread safe. */
    private static final class BarProgress implements Progress {
        private final ProgressBar bar;

        BarProgress(ProgressBar bar) {
            this.bar = bar;
        }

        @Override
        public synchronized void update(String stage, double fraction) {
            bar.stepTo(Math.round(Math.max(0, Math.min(1, fraction)) * 1000));
            bar.setExtraMessage(stage);
        }
    }
}
