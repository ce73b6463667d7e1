package org.turnmark.app.cli;

import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.Callable;

import me.tongfei.progressbar.ConsoleProgressBarConsumer;
import me.tongfei.progressbar.ProgressBar;
import me.tongfei.progressbar.ProgressBarBuilder;
import me.tongfei.progressbar.ProgressBarStyle;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

import org.turnmark.app.export.OutputFolder;
import org.turnmark.app.export.PlanWriter;
import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.app.pipeline.CaseFileReader;
import org.turnmark.app.pipeline.PlanFailedException;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.app.pipeline.Planner;
import org.turnmark.geom.Progress;

/**
 * {@code turnmark plan CASE.json --out DIR}: runs a full plan and writes the output folder. Progress
 * with stage names and time left on stderr (unless {@code --quiet}); a short summary with the
 * caution and the report's path on stdout. Exit codes: 0 done, 1 the computation failed, 2 bad input
 * (including an existing output folder without {@code --overwrite}).
 */
@Command(name = "plan",
        header = "Predicts supine lesion positions with uncertainty from a case file.",
        mixinStandardHelpOptions = true,
        description = {"Predicts the supine position of lesions marked on a prone breast MRI, with uncertainty,",
            "and writes plan.json, lesions.csv, NIfTI fields and images, a VTK mesh and a PDF report.", "",
            Caution.SHORT})
public final class PlanCommand implements Callable<Integer> {

    @Parameters(index = "0", paramLabel = "CASE.json", description = "case file (docs/case-format.md)")
    private Path caseFile;

    @Option(names = "--out", paramLabel = "DIR", description = "output folder (default: the case's \"output\")")
    private Path out;

    @Option(names = "--overwrite", description = "replace an existing output folder")
    private boolean overwrite;

    @Option(names = "--quiet", description = "no progress bar")
    private boolean quiet;

    @Option(names = "--threads", paramLabel = "N", description = "worker threads (default: all cores)")
    private Integer threads;

    @Option(names = "--samples", paramLabel = "N", description = "prior samples for the uncertainty (overrides the case)")
    private Integer samples;

    @CommandLine.Spec
    private CommandLine.Model.CommandSpec spec;

    @Override
    public Integer call() throws Exception {
        if (threads != null && threads < 1) {
            throw new UserInputException("--threads must be >= 1, got " + threads);
        }
        if (samples != null && (samples < 0 || samples > CaseFileReader.MAX_SAMPLES)) {
            throw new UserInputException("--samples must be in 0.." + CaseFileReader.MAX_SAMPLES + ", got " + samples);
        }
        CaseFile c = new CaseFileReader().read(caseFile);
        Path target = out != null ? out : c.output() != null ? Path.of(c.output()) : null;
        if (target == null) {
            throw new UserInputException("no output folder: pass --out DIR or set \"output\" in the case file");
        }
        if (Files.exists(target) && !overwrite) {
            throw new OutputFolder.ExistsException(target.toAbsolutePath().normalize());
        }
        PrintWriter err = spec.commandLine().getErr();
        PrintWriter o = spec.commandLine().getOut();
        Planner.Outcome outcome;
        List<String> files;
        try (ProgressSink sink = quiet ? null : new ProgressSink()) {
            Progress progress = sink == null ? Progress.NONE : sink;
            try {
                outcome = new Planner().run(c, new Planner.Options(samples), progress);
            } catch (PlanFailedException e) {
                throw new ProcessingException(e.getMessage(), e);
            }
            files = PlanWriter.write(outcome.result(), outcome.artifacts(), target, overwrite,
                    progress == Progress.NONE ? Progress.NONE : (stage, f) -> sink.update("writing outputs", 0.99));
        }
        PlanResult r = outcome.result();
        o.println(Caution.SHORT);
        for (PlanResult.LesionResult l : r.lesions()) {
            for (PlanResult.Prediction p : l.predictions()) {
                o.println(String.format(Locale.ROOT, "%s %-18s %-40s (%7.1f, %7.1f, %7.1f) mm%s", l.id(), p.method(),
                        "[" + p.frame() + "]", p.positionRasMm()[0], p.positionRasMm()[1], p.positionRasMm()[2],
                        p.ellipsoid95() == null ? "" : String.format(Locale.ROOT, "  95%% semi-axes %.1f/%.1f/%.1f mm",
                                p.ellipsoid95().semiAxesMm()[0], p.ellipsoid95().semiAxesMm()[1],
                                p.ellipsoid95().semiAxesMm()[2])));
            }
        }
        for (PlanResult.QualityFlag f : r.flags()) {
            if (!PlanResult.QualityFlag.OK.equals(f.severity())) {
                err.println("turnmark plan: " + f.severity() + ": " + f.check() + ": " + f.message());
            }
        }
        Path abs = target.toAbsolutePath().normalize();
        o.println("Wrote " + files.size() + " files to " + abs);
        o.println("Report: " + abs.resolve("report.pdf"));
        o.flush();
        return 0;
    }

    /** Progress on stderr: overall fraction, stage name and estimated time left. */
    private static final class ProgressSink implements Progress, AutoCloseable {
        private static final int TICKS = 1000;
        private final ProgressBar bar;
        private volatile String stage = "";

        ProgressSink() {
            bar = new ProgressBarBuilder().setTaskName("plan").setInitialMax(TICKS)
                    .setStyle(ProgressBarStyle.ASCII).setConsumer(new ConsoleProgressBarConsumer(System.err))
                    .setUpdateIntervalMillis(500).build();
        }

        @Override
        public synchronized void update(String s, double fraction) {
            long ticks = Math.round(Math.max(0, Math.min(1, fraction)) * TICKS);
            if (ticks > bar.getCurrent()) {
                bar.stepTo(ticks);
            }
            if (!s.equals(stage)) {
                stage = s;
                // The bar's own estimate of time left is linear in the overall fraction of weighted stages.
                bar.setExtraMessage(stage);
            }
        }

        @Override
        public void close() {
            bar.close();
        }
    }
}
