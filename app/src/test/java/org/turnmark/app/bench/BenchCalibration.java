package org.turnmark.app.bench;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.stream.Stream;

import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.SingularValueDecomposition_F64;
import org.turnmark.app.export.PlanWriter;
import org.turnmark.app.phantom.PhantomCase;
import org.turnmark.app.phantom.PhantomGenerator;
import org.turnmark.app.phantom.PhantomOptions;
import org.turnmark.app.phantom.PhantomWriter;
import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.app.pipeline.CaseFileReader;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.app.pipeline.Planner;
import org.turnmark.app.uncertainty.Coverage;
import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.geom.Progress;
import org.turnmark.geom.ResearchUse;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Calibration of the planner's uncertainty ellipsoids against phantom truth (a benchmark, not a test;
 * run by the command in docs/benchmarks.md, "Calibration of the 95 % ellipsoid").
 *
 * <p>For each seed it generates a phantom case with the project's generator (as {@code turnmark
 * phantom --seed N --spacing-mm S --element-mm E --lesions L --truth T}; by default {@code --truth priors}:
 * the truth conditions are one draw from the planner's default priors, so the ellipsoids are checked
 * against truth drawn from the distribution they claim; {@code --truth default} uses the generator's
 * deliberately different default conditions), runs the planner in-process on it (as
 * {@code turnmark plan --samples K}, optionally with another {@code model.element_size_mm}) and, for
 * every lesion and every supine-frame prediction, measures the error e = truth − prediction (mm), the
 * squared Mahalanobis distance d² = eᵀ Σ⁻¹ e with the prediction's covariance Σ (mm²), and whether the
 * truth lies inside the 68.27 % and 95 % ellipsoids (d² ≤ χ²₃(p), the quantiles the plan itself used;
 * χ²₃(0.95) = 7.81473, NIST/SEMATECH e-Handbook §1.3.6.7.4). Registration-only has no covariance; only
 * its error is recorded.
 *
 * <p>Prints one Markdown row per (seed, lesion, method) as cases finish, then per method: the coverage
 * at 68 % and 95 % with exact Clopper–Pearson 95 % intervals ({@link Coverage#clopperPearson}), the mean
 * d² (3 for calibrated Gaussian errors), the mean and median |e|, and how many lesions have a hybrid
 * error below 0.7 × the mechanics-only error. A case that throws is counted and reported, not fatal.
 *
 * <pre>
 * mvn -B -q -DskipTests package
 * nice -n 19 java -Xmx6g -cp app/target/turnmark.jar:app/target/test-classes \
 *   org.turnmark.app.bench.BenchCalibration --from 1 --to 20 [--spacing-mm 4] [--element-mm 8] [--lesions 1] \
 *   [--samples 8] [--plan-element-mm H] [--truth priors|default] [--threads N] [--work DIR] [--csv FILE]
 *   [--no-outputs]
 * </pre>
 */
public final class BenchCalibration {

    /** Method label of the mechanics-only prediction expressed in the supine image frame. */
    static final String MECHANICS_SUPINE = "mechanics-only (supine frame)";
    /** Method label of the mechanics-only prediction in the prone image frame (chest wall held in place). */
    static final String MECHANICS_PRONE = "mechanics-only (prone frame)";
    /** Hybrid counts as "well below" mechanics-only under this fraction of its error (issue wording). */
    static final double WELL_BELOW = 0.7;

    private BenchCalibration() {
    }

    /** Command-line settings. */
    record Settings(long from, long to, double spacingMm, double truthElementMm, int lesions, int samples,
                    Double planElementMm, Integer threads, Path work, Path csv, boolean writeOutputs,
                    PhantomOptions.Truth truth, PhantomOptions.FieldOfView fieldOfView) {
    }

    /**
     * One (seed, lesion, method) measurement; d² and the inside flags are null for a method without a
     * covariance.
     */
    record Row(long seed, String lesion, String method, double[] errorMm, double errorNormMm, Double d2,
               Boolean inside68, Boolean inside95, double[] semiAxes95Mm, int samplesOk, int samplesRequested,
               double planSeconds, double[] covarianceMm2, PlanResult.CovarianceTerms terms,
               double[] mechanicsSupineMm2, String refinement, Double mechanicsModelSdMm,
               Double alignmentErrorMm, Double mechanicsModelScale) {
    }

    /** Unique entries of a symmetric 3×3 (row-major) in the order the CSV names them. */
    static final int[] SYMMETRIC = {0, 4, 8, 1, 2, 5};
    /** Their CSV suffixes (RAS axes). */
    static final String[] SYMMETRIC_NAMES = {"xx", "yy", "zz", "xy", "xz", "yz"};

    public static void main(String[] args) throws IOException {
        Settings s;
        try {
            s = parse(args);
        } catch (IllegalArgumentException e) {
            System.err.println("BenchCalibration: " + e.getMessage());
            System.err.println(usage());
            System.exit(2);
            return;
        }
        if (s == null) {
            System.out.println(usage());
            return;
        }
        if (s.threads() != null) {
            // Before anything touches the pool (Parallel reads the property once).
            System.setProperty(Parallel.THREADS_PROPERTY, Integer.toString(s.threads()));
        }
        boolean tempWork = s.work() == null;
        Path work = tempWork ? Files.createTempDirectory("turnmark-calibration") : s.work();
        Files.createDirectories(work);

        System.out.println("# " + ResearchUse.SHORT);
        System.out.printf(Locale.ROOT, "seeds %d..%d, phantom %.3g mm voxels, truth elements %.3g mm, %d lesion(s), "
                        + "truth %s; plan: %d samples, elements %s; threads %d; load average at start %s%n",
                s.from(), s.to(), s.spacingMm(), s.truthElementMm(), s.lesions(), s.truth().key(), s.samples(),
                s.planElementMm() == null ? "as in case.json" : fmt(s.planElementMm()) + " mm", Parallel.threads(),
                loadAverage());
        System.out.println();
        System.out.println("| seed | lesion | method | error mm | d² | inside 68 % | inside 95 % | 95 % semi-axes mm "
                + "| samples ok | plan s |");
        System.out.println("|---|---|---|---|---|---|---|---|---|---|");

        List<Row> rows = new ArrayList<>();
        List<String> failures = new ArrayList<>();
        List<double[]> caseTimes = new ArrayList<>();
        for (long seed = s.from(); seed <= s.to(); seed++) {
            Path caseDir = work.resolve(String.format(Locale.ROOT, "phantom-seed%d-sp%s-el%s-les%d-truth-%s%s", seed,
                    fmt(s.spacingMm()), fmt(s.truthElementMm()), s.lesions(), s.truth().key(),
                    s.fieldOfView() == PhantomOptions.FieldOfView.BREAST ? "" : "-fov-" + s.fieldOfView().key()));
            Path planDir = work.resolve(caseDir.getFileName() + "-plan");
            try {
                double tPhantom = phantom(s, seed, caseDir);
                CaseFile c = new CaseFileReader().read(caseDir.resolve("case.json")).withElementSizeMm(s.planElementMm());
                long t0 = System.nanoTime();
                Planner.Outcome out = new Planner().run(c, new Planner.Options(s.samples()),
                        new StageLog("seed " + seed));
                double tPlan = (System.nanoTime() - t0) * 1e-9;
                double tWrite = 0;
                if (s.writeOutputs()) {
                    long t1 = System.nanoTime();
                    PlanWriter.write(out.result(), out.artifacts(), planDir, true, Progress.NONE);
                    tWrite = (System.nanoTime() - t1) * 1e-9;
                }
                List<Row> caseRows = measure(seed, c, out.result(), tPlan, truePlacement(caseDir));
                for (Row r : caseRows) {
                    System.out.println(markdown(r));
                }
                rows.addAll(caseRows);
                caseTimes.add(new double[] {seed, tPhantom, tPlan, tWrite});
                System.err.printf(Locale.ROOT, "seed %d: phantom %.1f s%s, plan %.1f s, writing %.1f s%n", seed, tPhantom,
                        tPhantom == 0 ? " (reused)" : "", tPlan, tWrite);
            } catch (Exception e) {
                String msg = "seed " + seed + ": " + e.getClass().getSimpleName() + ": " + e.getMessage();
                failures.add(msg);
                System.err.println("FAILED " + msg);
            } finally {
                if (tempWork) {
                    deleteTree(caseDir);
                    deleteTree(planDir);
                }
            }
            if (s.csv() != null) {
                writeCsv(s.csv(), rows);
            }
        }
        if (tempWork) {
            deleteTree(work);
        }
        summary(rows, failures, caseTimes, s.to() - s.from() + 1);
        System.out.println("load average at end " + loadAverage());
    }

    /** Generates the phantom into {@code dir}, or reuses a complete one there; returns the seconds spent. */
    private static double phantom(Settings s, long seed, Path dir) throws IOException {
        if (Files.isRegularFile(dir.resolve("case.json"))) {
            return 0;
        }
        PhantomOptions d = PhantomOptions.defaults(seed);
        PhantomOptions o = new PhantomOptions(seed, s.spacingMm(), d.breasts(), d.side(), d.breastVolumeMl(),
                d.projection(), d.ptosis(), d.lesionDiameterMm(), s.lesions(), d.contrast(), d.snr(),
                s.truthElementMm(), s.truth(), s.fieldOfView());
        long t0 = System.nanoTime();
        PhantomCase c = PhantomGenerator.generate(o, Progress.NONE);
        String id = dir.getFileName().toString();
        String command = String.format(Locale.ROOT, "turnmark phantom --seed %d --spacing-mm %s --element-mm %s "
                + "--lesions %d --truth %s --field-of-view %s --out %s", seed, fmt(s.spacingMm()),
                fmt(s.truthElementMm()), s.lesions(), s.truth().key(), s.fieldOfView().key(), id);
        PhantomWriter.write(c, dir, id, command, true);
        return (System.nanoTime() - t0) * 1e-9;
    }

    /**
     * The phantom's rigid torso placement P (prone image frame → supine image frame), fitted to its truth
     * displacement on the chest-wall voxels of the prone labels (label 4: rigid by construction) by the
     * Kabsch least-squares rotation (SVD of the 3×3 cross-covariance, EJML).
     */
    static Affine3D truePlacement(Path caseDir) throws IOException {
        NiftiReader rd = new NiftiReader();
        Volume labels = rd.readVolume(caseDir.resolve("prone_labels.nii.gz")).volume();
        VectorField u = rd.readVectorField(caseDir.resolve("truth")
                .resolve(PhantomWriter.DISPLACEMENT)).field();
        Grid3 g = labels.grid();
        if (!g.sameGrid(u.grid(), 1e-6)) {
            throw new IOException(caseDir + ": truth displacement and prone labels are on different grids");
        }
        List<double[]> from = new ArrayList<>();
        List<double[]> to = new ArrayList<>();
        float[] l = labels.data();
        for (int n = 0; n < l.length; n++) {
            if (l[n] == MaterialTable.CHEST_WALL) {
                int i = n % g.nx();
                int j = (n / g.nx()) % g.ny();
                int k = n / (g.nx() * g.ny());
                double[] x = g.worldOf(i, j, k);
                from.add(x);
                to.add(new double[] {x[0] + u.x()[n], x[1] + u.y()[n], x[2] + u.z()[n]});
            }
        }
        return kabsch(from, to);
    }

    /** Least-squares rigid map (rotation + translation) taking {@code from} onto {@code to} (Kabsch). */
    static Affine3D kabsch(List<double[]> from, List<double[]> to) {
        int n = from.size();
        if (n < 3) {
            throw new IllegalArgumentException("at least 3 point pairs are needed, got " + n);
        }
        double[] cf = new double[3];
        double[] ct = new double[3];
        for (int p = 0; p < n; p++) {
            for (int a = 0; a < 3; a++) {
                cf[a] += from.get(p)[a] / n;
                ct[a] += to.get(p)[a] / n;
            }
        }
        DMatrixRMaj h = new DMatrixRMaj(3, 3);
        for (int p = 0; p < n; p++) {
            for (int a = 0; a < 3; a++) {
                for (int b2 = 0; b2 < 3; b2++) {
                    h.add(a, b2, (from.get(p)[a] - cf[a]) * (to.get(p)[b2] - ct[b2]));
                }
            }
        }
        SingularValueDecomposition_F64<DMatrixRMaj> svd =
                DecompositionFactory_DDRM.svd(3, 3, true, true, false);
        if (!svd.decompose(h)) {
            throw new IllegalStateException("SVD failed");
        }
        DMatrixRMaj uu = svd.getU(null, false);
        DMatrixRMaj v = svd.getV(null, false);
        // R = V diag(1, 1, det(V Uᵀ)) Uᵀ: the nearest proper rotation
        DMatrixRMaj vut = new DMatrixRMaj(3, 3);
        CommonOps_DDRM.multTransB(v, uu, vut);
        double d = Math.signum(CommonOps_DDRM.det(vut));
        DMatrixRMaj dm = CommonOps_DDRM.diag(1, 1, d);
        DMatrixRMaj vd = new DMatrixRMaj(3, 3);
        CommonOps_DDRM.mult(v, dm, vd);
        DMatrixRMaj r = new DMatrixRMaj(3, 3);
        CommonOps_DDRM.multTransB(vd, uu, r);
        double[] t = new double[3];
        for (int a = 0; a < 3; a++) {
            t[a] = ct[a] - (r.get(a, 0) * cf[0] + r.get(a, 1) * cf[1] + r.get(a, 2) * cf[2]);
        }
        return new Affine3D(r.get(0, 0), r.get(0, 1), r.get(0, 2), t[0], r.get(1, 0), r.get(1, 1),
                r.get(1, 2), t[1], r.get(2, 0), r.get(2, 1), r.get(2, 2), t[2]);
    }

    /**
     * Rows for every lesion × supine-frame method of one plan, against the case's inline truth; with the
     * true torso placement P also the mechanics-only prediction in the prone frame against P⁻¹(truth), and
     * on the supine-frame mechanics-only row the error of the plan's rigid alignment at the lesion,
     * |T⁻¹(q) − P(q)| with q = P⁻¹(truth).
     */
    static List<Row> measure(long seed, CaseFile c, PlanResult r, double planSeconds,
                             Affine3D placement) {
        Map<String, double[]> truth = new LinkedHashMap<>();
        if (c.truth() != null && c.truth().lesions() != null) {
            for (CaseFile.TruthLesion t : c.truth().lesions()) {
                if (t.supineRasMm() != null) {
                    truth.put(t.id(), t.supineRasMm());
                }
            }
        }
        int requested = r.uncertainty().samples();
        int ok = r.uncertainty().completed();
        List<Row> rows = new ArrayList<>();
        for (PlanResult.LesionResult l : r.lesions()) {
            double[] mechanicsSupine = null;
            for (PlanResult.Prediction p : l.predictions()) {
                if (PlanResult.MECHANICS.equals(p.method()) && PlanResult.FRAME_SUPINE.equals(p.frame())) {
                    mechanicsSupine = p.covarianceMm2();
                }
            }
            double[] t = truth.get(l.id());
            if (t == null) {
                throw new IllegalStateException("case has no true supine centroid for lesion " + l.id());
            }
            double[] q = placement == null ? null : placement.inverse().applyPoint(t[0], t[1], t[2]);
            Double alignErr = null;
            if (q != null && r.rigidAlignment() != null) {
                double[] m = r.rigidAlignment().proneToSupineRas();
                double d2a = 0;
                for (int a = 0; a < 3; a++) {
                    double ya = m[4 * a] * q[0] + m[4 * a + 1] * q[1] + m[4 * a + 2] * q[2] + m[4 * a + 3];
                    d2a += (ya - t[a]) * (ya - t[a]);
                }
                alignErr = Math.sqrt(d2a);
            }
            for (PlanResult.Prediction p : l.predictions()) {
                boolean prone = PlanResult.FRAME_PRONE.equals(p.frame());
                if (prone && !(q != null && PlanResult.MECHANICS.equals(p.method()))) {
                    continue; // a prone-frame prediction has a truth only through the phantom's placement
                }
                double[] x = p.positionRasMm();
                double[] tt = prone ? q : t;
                double[] e = {tt[0] - x[0], tt[1] - x[1], tt[2] - x[2]};
                double norm = Math.sqrt(e[0] * e[0] + e[1] * e[1] + e[2] * e[2]);
                String method = PlanResult.MECHANICS.equals(p.method()) ? prone ? MECHANICS_PRONE : MECHANICS_SUPINE
                        : p.method();
                Double d2 = null;
                Boolean in68 = null;
                Boolean in95 = null;
                double[] axes = null;
                if (p.covarianceMm2() != null) {
                    d2 = Coverage.mahalanobisSquared(e, p.covarianceMm2());
                    double chi68 = p.ellipsoid68() != null ? p.ellipsoid68().chiSquare() : Ellipsoid.chiSquare3(0.6827);
                    double chi95 = p.ellipsoid95() != null ? p.ellipsoid95().chiSquare() : Ellipsoid.chiSquare3(0.95);
                    in68 = d2 <= chi68;
                    in95 = d2 <= chi95;
                    axes = p.ellipsoid95() != null ? p.ellipsoid95().semiAxesMm() : null;
                }
                rows.add(new Row(seed, l.id(), method, e, norm, d2, in68, in95, axes, ok, requested, planSeconds,
                        p.covarianceMm2(), p.covarianceTerms(), p.covarianceTerms() == null ? null : mechanicsSupine,
                        l.refinement(), p.covarianceMm2() == null ? null : MECHANICS_SUPINE.equals(method)
                        ? c.priors().mechanicsSupineSdMm() : MECHANICS_PRONE.equals(method)
                        ? c.priors().mechanicsProneSdMm() : null, MECHANICS_SUPINE.equals(method) ? alignErr : null,
                        p.covarianceMm2() == null ? null : MECHANICS_SUPINE.equals(method) ? Double.valueOf(1)
                        : MECHANICS_PRONE.equals(method) ? Planner.proneScale(c.priors(),
                        r.warnings().contains(Planner.WIDE_FIELD_WARNING)) : null));
            }
        }
        return rows;
    }

    private static void summary(List<Row> rows, List<String> failures, List<double[]> caseTimes, long cases) {
        System.out.println();
        System.out.printf(Locale.ROOT, "Cases: %d run, %d completed, %d failed.%n", cases, caseTimes.size(),
                failures.size());
        for (String f : failures) {
            System.out.println("- failed: " + f);
        }
        System.out.println();
        System.out.println("| method | lesions | inside 68 % | 68 % coverage (95 % CI) | inside 95 % "
                + "| 95 % coverage (95 % CI) | mean d² | mean error mm | median error mm |");
        System.out.println("|---|---|---|---|---|---|---|---|---|");
        for (String method : new String[] {MECHANICS_PRONE, MECHANICS_SUPINE, PlanResult.HYBRID,
            PlanResult.REGISTRATION}) {
            List<Row> m = new ArrayList<>();
            for (Row r : rows) {
                if (r.method().equals(method)) {
                    m.add(r);
                }
            }
            if (m.isEmpty()) {
                continue;
            }
            double[] err = new double[m.size()];
            int n = 0;
            int in68 = 0;
            int in95 = 0;
            double sumD2 = 0;
            for (int i = 0; i < m.size(); i++) {
                Row r = m.get(i);
                err[i] = r.errorNormMm();
                if (r.d2() != null) {
                    n++;
                    sumD2 += r.d2();
                    in68 += r.inside68() ? 1 : 0;
                    in95 += r.inside95() ? 1 : 0;
                }
            }
            String c68 = "–";
            String c95 = "–";
            String i68 = "–";
            String i95 = "–";
            String md2 = "–";
            if (n > 0) {
                i68 = in68 + " / " + n;
                i95 = in95 + " / " + n;
                c68 = coverage(in68, n);
                c95 = coverage(in95, n);
                md2 = String.format(Locale.ROOT, "%.2f", sumD2 / n);
            }
            System.out.printf(Locale.ROOT, "| %s | %d | %s | %s | %s | %s | %s | %.2f | %.2f |%n", method, m.size(), i68,
                    c68, i95, c95, md2, Arrays.stream(err).average().orElse(0), median(err));
        }
        // Hybrid vs mechanics-only per lesion.
        Map<String, Double> mech = new LinkedHashMap<>();
        for (Row r : rows) {
            if (r.method().equals(MECHANICS_SUPINE)) {
                mech.put(r.seed() + "/" + r.lesion(), r.errorNormMm());
            }
        }
        int pairs = 0;
        int below = 0;
        for (Row r : rows) {
            Double em = mech.get(r.seed() + "/" + r.lesion());
            if (r.method().equals(PlanResult.HYBRID) && em != null) {
                pairs++;
                below += r.errorNormMm() < WELL_BELOW * em ? 1 : 0;
            }
        }
        System.out.println();
        System.out.printf(Locale.ROOT, "Hybrid error < %.1f × mechanics-only error: %d of %d lesions.%n", WELL_BELOW,
                below, pairs);
        double[] align = rows.stream().filter(r -> r.alignmentErrorMm() != null)
                .mapToDouble(Row::alignmentErrorMm).toArray();
        if (align.length > 0) {
            System.out.printf(Locale.ROOT, "Rigid alignment error at the lesion (plan's prone → supine map against the "
                            + "phantom's torso placement): mean %.2f mm, median %.2f mm, max %.2f mm over %d lesions.%n",
                    Arrays.stream(align).average().orElse(0), median(align), Arrays.stream(align).max().orElse(0),
                    align.length);
        }
        if (!caseTimes.isEmpty()) {
            double[] ph = caseTimes.stream().mapToDouble(t -> t[1]).filter(v -> v > 0).toArray();
            double[] pl = caseTimes.stream().mapToDouble(t -> t[2]).toArray();
            double[] wr = caseTimes.stream().mapToDouble(t -> t[3]).toArray();
            System.out.printf(Locale.ROOT, "Wall time per case: phantom mean %s s (%d generated), plan mean %.1f s "
                            + "(min %.1f, max %.1f), writing outputs mean %.1f s.%n",
                    ph.length == 0 ? "–" : String.format(Locale.ROOT, "%.1f", Arrays.stream(ph).average().orElse(0)),
                    ph.length, Arrays.stream(pl).average().orElse(0), Arrays.stream(pl).min().orElse(0),
                    Arrays.stream(pl).max().orElse(0), Arrays.stream(wr).average().orElse(0));
        }
    }

    private static String coverage(int x, int n) {
        Coverage.Interval ci = Coverage.clopperPearson(x, n, 0.95);
        return String.format(Locale.ROOT, "%.1f %% (%.1f–%.1f %%)", 100.0 * x / n, 100 * ci.lower(), 100 * ci.upper());
    }

    static double median(double[] v) {
        if (v.length == 0) {
            return 0;
        }
        double[] s = v.clone();
        Arrays.sort(s);
        int h = s.length / 2;
        return s.length % 2 == 1 ? s[h] : 0.5 * (s[h - 1] + s[h]);
    }

    private static String markdown(Row r) {
        return String.format(Locale.ROOT, "| %d | %s | %s | %.2f | %s | %s | %s | %s | %d / %d | %.1f |", r.seed(),
                r.lesion(), r.method(), r.errorNormMm(), r.d2() == null ? "–" : String.format(Locale.ROOT, "%.2f", r.d2()),
                yesNo(r.inside68()), yesNo(r.inside95()), r.semiAxes95Mm() == null ? "–"
                        : String.format(Locale.ROOT, "%.1f / %.1f / %.1f", r.semiAxes95Mm()[0], r.semiAxes95Mm()[1],
                        r.semiAxes95Mm()[2]), r.samplesOk(), r.samplesRequested(), r.planSeconds());
    }

    private static String yesNo(Boolean b) {
        return b == null ? "–" : b ? "yes" : "no";
    }

    /** Writes every row so far as CSV (temp file in the same folder, then an atomic move). */
    private static void writeCsv(Path csv, List<Row> rows) throws IOException {
        StringBuilder b = new StringBuilder();
        b.append("# ").append(ResearchUse.SHORT).append('\n');
        b.append("# errors (truth - prediction) and covariances in the supine image frame (prone-frame rows: the "
                + "prone image frame), world RAS+ mm / mm2; cov_*: the prediction's covariance; hybrid rows: "
                + "hyb_marking_* (marking term), hyb_mechanics_* (mechanics-only covariance), hyb_registration_sd_mm; "
                + "cov = marking_weight * marking + sd^2 I + mechanics_weight * mechanics; mechanics-only rows: cov = sampled covariance (rotated into the supine frame for supine-frame "
                + "rows; prone-frame rows: times mech_model_scale) + mech_model_sd_mm^2 I\n");
        b.append("seed,lesion,method,error_mm,error_x_mm,error_y_mm,error_z_mm,d2,inside_68,inside_95,"
                + "semi_axis95_1_mm,semi_axis95_2_mm,semi_axis95_3_mm,samples_ok,samples_requested,plan_s");
        for (String prefix : new String[] {"cov_", "hyb_marking_", "hyb_mechanics_"}) {
            for (String n : SYMMETRIC_NAMES) {
                b.append(',').append(prefix).append(n).append("_mm2");
            }
        }
        b.append(",hyb_registration_sd_mm,hyb_marking_weight,hyb_mechanics_weight,centroid_refined_on_label,"
                + "mech_model_sd_mm,alignment_error_at_lesion_mm,mech_model_scale\n");
        for (Row r : rows) {
            b.append(r.seed()).append(',').append(r.lesion()).append(',').append(r.method()).append(',')
                    .append(num(r.errorNormMm())).append(',').append(num(r.errorMm()[0])).append(',')
                    .append(num(r.errorMm()[1])).append(',').append(num(r.errorMm()[2])).append(',')
                    .append(r.d2() == null ? "" : num(r.d2())).append(',')
                    .append(r.inside68() == null ? "" : r.inside68()).append(',')
                    .append(r.inside95() == null ? "" : r.inside95());
            for (int i = 0; i < 3; i++) {
                b.append(',').append(r.semiAxes95Mm() == null ? "" : num(r.semiAxes95Mm()[i]));
            }
            b.append(',').append(r.samplesOk()).append(',').append(r.samplesRequested()).append(',')
                    .append(num(r.planSeconds()));
            PlanResult.CovarianceTerms t = r.terms();
            for (double[] m : new double[][] {r.covarianceMm2(), t == null ? null : t.markingMm2(),
                    r.mechanicsSupineMm2()}) {
                for (int k : SYMMETRIC) {
                    b.append(',').append(m == null ? "" : num(m[k]));
                }
            }
            b.append(',').append(t == null ? "" : num(t.registrationSdMm())).append(',')
                    .append(t == null ? "" : num(t.markingWeight())).append(',')
                    .append(t == null ? "" : num(t.mechanicsWeight())).append(',')
                    .append(r.refinement() != null && r.refinement().startsWith("centroid of label")).append(',')
                    .append(r.mechanicsModelSdMm() == null ? "" : num(r.mechanicsModelSdMm())).append(',')
                    .append(r.alignmentErrorMm() == null ? "" : num(r.alignmentErrorMm())).append(',')
                    .append(r.mechanicsModelScale() == null ? "" : num(r.mechanicsModelScale())).append('\n');
        }
        Path abs = csv.toAbsolutePath();
        Path dir = abs.getParent();
        Files.createDirectories(dir);
        Path tmp = Files.createTempFile(dir, "." + abs.getFileName(), ".tmp");
        try {
            Files.writeString(tmp, b, StandardCharsets.UTF_8);
            Files.move(tmp, abs, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
        } finally {
            Files.deleteIfExists(tmp);
        }
    }

    private static String num(double v) {
        return String.format(Locale.ROOT, "%.4f", v);
    }

    private static String fmt(double v) {
        return v == Math.rint(v) ? Long.toString((long) v) : Double.toString(v);
    }

    private static String loadAverage() {
        try {
            return Files.readString(Path.of("/proc/loadavg")).trim();
        } catch (IOException e) {
            return "unknown (" + e.getMessage() + ")";
        }
    }

    private static void deleteTree(Path p) {
        if (!Files.exists(p)) {
            return;
        }
        try (Stream<Path> w = Files.walk(p)) {
            for (Path q : w.sorted(Comparator.reverseOrder()).toList()) {
                Files.deleteIfExists(q);
            }
        } catch (IOException e) {
            System.err.println("could not delete " + p + ": " + e.getMessage());
        }
    }

    static Settings parse(String[] args) {
        Long from = null;
        Long to = null;
        double spacing = 4;
        double truthElement = 8;
        int lesions = 1;
        int samples = 8;
        Double planElement = null;
        Integer threads = null;
        Path work = null;
        Path csv = null;
        boolean write = true;
        PhantomOptions.Truth truth = PhantomOptions.Truth.PRIORS;
        PhantomOptions.FieldOfView fov = PhantomOptions.FieldOfView.BREAST;
        for (int i = 0; i < args.length; i++) {
            String a = args[i];
            switch (a) {
                case "--help", "-h" -> {
                    return null;
                }
                case "--no-outputs" -> write = false;
                default -> {
                    if (i + 1 >= args.length) {
                        throw new IllegalArgumentException("missing value after " + a);
                    }
                    String v = args[++i];
                    try {
                        switch (a) {
                            case "--from" -> from = Long.parseLong(v);
                            case "--to" -> to = Long.parseLong(v);
                            case "--spacing-mm" -> spacing = Double.parseDouble(v);
                            case "--element-mm" -> truthElement = Double.parseDouble(v);
                            case "--lesions" -> lesions = Integer.parseInt(v);
                            case "--samples" -> samples = Integer.parseInt(v);
                            case "--plan-element-mm" -> planElement = Double.parseDouble(v);
                            case "--threads" -> threads = Integer.parseInt(v);
                            case "--truth" -> truth = PhantomOptions.Truth.parse(v);
                            case "--field-of-view" -> fov = PhantomOptions.FieldOfView.parse(v);
                            case "--work" -> work = Path.of(v);
                            case "--csv" -> csv = Path.of(v);
                            default -> throw new IllegalArgumentException("unknown option " + a);
                        }
                    } catch (NumberFormatException e) {
                        throw new IllegalArgumentException(a + " needs a number, got '" + v + "'");
                    }
                }
            }
        }
        if (from == null) {
            throw new IllegalArgumentException("--from SEED is required");
        }
        if (to == null) {
            to = from;
        }
        if (to < from) {
            throw new IllegalArgumentException("--to must be >= --from, got " + to + " < " + from);
        }
        if (samples < 2 || samples > CaseFileReader.MAX_SAMPLES) {
            // Fewer than two samples give no covariance, so nothing to calibrate.
            throw new IllegalArgumentException("--samples must be in 2.." + CaseFileReader.MAX_SAMPLES + ", got " + samples);
        }
        if (planElement != null && !(planElement > 0 && planElement <= 50)) {
            throw new IllegalArgumentException("--plan-element-mm must be in (0, 50] mm, got " + planElement);
        }
        if (threads != null && threads < 1) {
            throw new IllegalArgumentException("--threads must be >= 1, got " + threads);
        }
        // Spacing, truth element size and lesion count are validated by PhantomOptions (named ranges).
        PhantomOptions d = PhantomOptions.defaults(from);
        new PhantomOptions(from, spacing, d.breasts(), d.side(), d.breastVolumeMl(), d.projection(), d.ptosis(),
                d.lesionDiameterMm(), lesions, d.contrast(), d.snr(), truthElement);
        return new Settings(from, to, spacing, truthElement, lesions, samples, planElement, threads, work, csv, write,
                truth, fov);
    }

    private static String usage() {
        return "usage: BenchCalibration --from SEED [--to SEED] [--spacing-mm 4] [--element-mm 8 (truth)] [--lesions 1]\n"
                + "         [--samples 8] [--plan-element-mm H (default: case.json's)] [--truth priors|default (priors)]\n"
                + "         [--field-of-view breast|chest (breast)]\n"
                + "         [--threads N] [--work DIR (kept)]\n"
                + "         [--csv FILE] [--no-outputs (skip writing the plan folder)]";
    }

    /** Prints each new stage of a plan with its elapsed wall time on stderr. */
    private static final class StageLog implements Progress {
        private final String prefix;
        private final long t0 = System.nanoTime();
        private String stage = "";

        StageLog(String prefix) {
            this.prefix = prefix;
        }

        @Override
        public synchronized void update(String s, double fraction) {
            if (!s.equals(stage)) {
                stage = s;
                System.err.printf(Locale.ROOT, "%s: %s (%.1f s)%n", prefix, s, (System.nanoTime() - t0) * 1e-9);
            }
        }
    }
}
