package org.turnmark.app.bench;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.univariate.BrentOptimizer;
import org.apache.commons.math3.optim.univariate.SearchInterval;
import org.apache.commons.math3.optim.univariate.UnivariateObjectiveFunction;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.app.uncertainty.Coverage;
import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.geom.ResearchUse;

/**
 * Maximum-likelihood fit of the hybrid covariance model to a calibration CSV written by
 * {@link BenchCalibration}, and its check on held-out seeds (a benchmark tool, not a test; command in
 * docs/benchmarks.md, "Calibration of the 95 % ellipsoid").
 *
 * <p>Model (docs/planner.md, Uncertainty): for lesion i the hybrid error e_i (truth − prediction, supine
 * frame, mm) is taken as Gaussian N(0, Σ_i) with Σ_i = a_i K_i + s² I + w G_i: K_i the lesion-marking term
 * and a_i its weight as the plan used it (0 for a centroid refined on a lesion label), s the registration
 * SD (mm) and G_i a per-lesion shape with weight w: {@link Shape#MECHANICS} (the planner's model) G_i = the
 * mechanics-only covariance in the supine frame, {@link Shape#SPREAD} G_i = |ρ_i|²/3 I with ρ_i the hybrid
 * minus the registration-only prediction (from the CSV, ρ = e_registration − e_hybrid), or
 * {@link Shape#CORRECTION} G_i = |δ_i|²/3 I with δ_i the hybrid minus the mechanics-only prediction (the
 * registration's correction at the lesion; δ = e_mechanics − e_hybrid). {@code --loo FROM-TO} fits every
 * shape to the pooled seeds and checks each lesion against the fit to the others (leave-one-out). Every shape is fitted and printed with its AIC; {@code --shape} picks the one the
 * planner-default rows use. The fit maximises the Gaussian log-likelihood
 * −½ Σ_i (log det Σ_i + e_iᵀ Σ_i⁻¹ e_i) over s &gt; 0 and w ≥ 0: for each w the profile over log s by Brent's
 * method, w on a grid and then by Brent's method around the best grid point. Standard errors from the
 * numerical Hessian of the negative log-likelihood (observed information) at the optimum.
 *
 * <p>Mechanics-only, each frame on its own: e_i ~ N(0, Σ_m,i + s² I) with Σ_m,i the sampled covariance
 * (rotated into the supine frame for the supine-frame rows; the CSV's cov_* less the s² the plan added,
 * column mech_model_sd_mm, earlier mech_supine_sd_mm, and divided by the factor in mech_model_scale where that column exists; CSVs written before such a column existed hold
 * Σ_m,i alone) and s the isotropic term of that frame: s_m (supine frame: the rigid alignment's error and
 * the model error) or s_p (prone frame: the model error). The same profile fit with Σ_m,i in the place of
 * K (weight 1) and no shape term.
 *
 * <pre>
 * java -cp app/target/turnmark.jar:app/target/test-classes org.turnmark.app.bench.BenchCalibrationFit \
 *   --csv FILE.csv --fit 1-24 --check 25-48 [--shape mechanics|correction|spread] [--planner-sd-mm S --planner-weight W] | --loo FROM-TO
 * </pre>
 */
public final class BenchCalibrationFit {

    /** Search range of the registration SD s (mm): below 0.01 mm is below any voxel, above 20 mm no plan. */
    static final double MIN_SD_MM = 0.01;
    static final double MAX_SD_MM = 20;
    /** Search range of the shape weight w, and the grid step over it before Brent's refinement. */
    static final double MAX_WEIGHT = 2;
    static final double WEIGHT_STEP = 0.005;
    /** Brent tolerances (relative, absolute) on log s and on w: far below what the data can resolve. */
    private static final double REL_TOL = 1e-10;
    private static final double ABS_TOL = 1e-10;
    private static final int MAX_EVAL = 500;

    private BenchCalibrationFit() {
    }

    /**
     * One lesion's hybrid error and covariance terms (supine frame).
     *
     * @param seed         phantom seed
     * @param errorMm      e = truth − prediction (mm)
     * @param markingMm2   K, 3×3 row-major (mm²)
     * @param markingWeight a, as the plan used it
     * @param shapeMm2     G, 3×3 row-major (mm²)
     */
    record Case(long seed, double[] errorMm, double[] markingMm2, double markingWeight, double[] shapeMm2) {
    }

    /** The per-lesion shape G of the weighted term. */
    enum Shape {
        /** ‖δ‖²/3 I, δ = hybrid − mechanics-only prediction. */
        CORRECTION,
        /** The mechanics-only covariance in the supine frame (the planner's model). */
        MECHANICS,
        /**
         * ‖ρ‖²/3 I, ρ = hybrid − registration-only prediction: the spread of the same registration
         * started from the mechanics and from a rigid start.
         */
        SPREAD;

        /** How the shape is written in the fit's table. */
        String symbol() {
            return switch (this) {
                case CORRECTION -> "‖δ‖²/3 I";
                case MECHANICS -> "Σ_m";
                case SPREAD -> "‖ρ‖²/3 I";
            };
        }
    }

    /**
     * Fitted parameters.
     *
     * @param registrationSdMm s (mm)
     * @param weight           w
     * @param sdSeMm           standard error of s (mm), NaN when w is on its bound
     * @param weightSe         standard error of w, NaN when w is on its bound
     * @param negLogLik        ½ Σ (log det Σ + d²) at the optimum (constant 3/2 log 2π per case omitted)
     */
    record Fit(double registrationSdMm, double weight, double sdSeMm, double weightSe, double negLogLik) {
    }

    /** Σ_i = a K + s² I + w G (mm²). */
    static double[] covariance(Case c, double sdMm, double weight) {
        double[] s = new double[9];
        for (int k = 0; k < 9; k++) {
            s[k] = c.markingWeight() * c.markingMm2()[k] + weight * c.shapeMm2()[k];
        }
        s[0] += sdMm * sdMm;
        s[4] += sdMm * sdMm;
        s[8] += sdMm * sdMm;
        return s;
    }

    /** ½ Σ_i (log det Σ_i + e_iᵀ Σ_i⁻¹ e_i); +∞ where some Σ_i is not positive definite. */
    static double negLogLik(List<Case> cases, double sdMm, double weight) {
        double sum = 0;
        for (Case c : cases) {
            double[] s = covariance(c, sdMm, weight);
            double det = det3(s);
            if (!(det > 0)) {
                return Double.POSITIVE_INFINITY;
            }
            sum += Math.log(det) + Coverage.mahalanobisSquared(c.errorMm(), s);
        }
        return 0.5 * sum;
    }

    /** ML registration SD for a fixed shape weight (Brent on log s). */
    static double profileSd(List<Case> cases, double weight) {
        BrentOptimizer opt = new BrentOptimizer(REL_TOL, ABS_TOL);
        return Math.exp(opt.optimize(new MaxEval(MAX_EVAL), GoalType.MINIMIZE,
                new UnivariateObjectiveFunction(ls -> negLogLik(cases, Math.exp(ls), weight)),
                new SearchInterval(Math.log(MIN_SD_MM), Math.log(MAX_SD_MM))).getPoint());
    }

    /** ML fit of s and w. */
    static Fit fit(List<Case> cases) {
        if (cases.isEmpty()) {
            throw new IllegalArgumentException("no cases to fit");
        }
        double bestW = 0;
        double best = Double.POSITIVE_INFINITY;
        int steps = (int) Math.round(MAX_WEIGHT / WEIGHT_STEP);
        for (int i = 0; i <= steps; i++) {
            double w = i * WEIGHT_STEP;
            double v = negLogLik(cases, profileSd(cases, w), w);
            if (v < best) {
                best = v;
                bestW = w;
            }
        }
        double lo = Math.max(0, bestW - WEIGHT_STEP);
        double hi = Math.min(MAX_WEIGHT, bestW + WEIGHT_STEP);
        BrentOptimizer opt = new BrentOptimizer(REL_TOL, ABS_TOL);
        double w = opt.optimize(new MaxEval(MAX_EVAL), GoalType.MINIMIZE,
                new UnivariateObjectiveFunction(x -> negLogLik(cases, profileSd(cases, x), x)),
                new SearchInterval(lo, hi, bestW)).getPoint();
        if (negLogLik(cases, profileSd(cases, 0), 0) <= negLogLik(cases, profileSd(cases, w), w)) {
            w = 0; // the boundary
        }
        double s = profileSd(cases, w);
        double nll = negLogLik(cases, s, w);
        double seS = Double.NaN;
        double seW = Double.NaN;
        if (w > 2 * WEIGHT_STEP) {
            // Observed information: central second differences of the NLL in (s, w).
            double hs = 1e-3 * s;
            double hw = 1e-3 * Math.max(w, WEIGHT_STEP);
            double fss = (negLogLik(cases, s + hs, w) - 2 * nll + negLogLik(cases, s - hs, w)) / (hs * hs);
            double fww = (negLogLik(cases, s, w + hw) - 2 * nll + negLogLik(cases, s, w - hw)) / (hw * hw);
            double fsw = (negLogLik(cases, s + hs, w + hw) - negLogLik(cases, s + hs, w - hw)
                    - negLogLik(cases, s - hs, w + hw) + negLogLik(cases, s - hs, w - hw)) / (4 * hs * hw);
            double det = fss * fww - fsw * fsw;
            if (det > 0) {
                seS = Math.sqrt(fww / det);
                seW = Math.sqrt(fss / det);
            }
        }
        return new Fit(s, w, seS, seW, nll);
    }

    /** Coverage counts and mean d² of a covariance model over cases. */
    record Check(int n, int inside68, int inside95, double meanD2) {
    }

    /**
     * Leave-one-out result: each case checked against the fit to all the others.
     *
     * @param check       coverage and mean d² of the left-out cases
     * @param negLogLik   −Σ log N(e_i; 0, Σ_i) of the left-out cases (constant 3/2 log 2π per case omitted):
     *                    the out-of-sample counterpart of {@link Fit#negLogLik()}, lower is better
     */
    record Loo(Check check, double negLogLik) {
    }

    /**
     * Leave-one-out cross-validation of the fit: for each case, (s, w) fitted to the others
     * ({@link #fit}, or the profile over s alone when {@code mechanicsOnly}) and that case checked.
     */
    static Loo leaveOneOut(List<Case> cases, boolean mechanicsOnly) {
        List<Case> left = new ArrayList<>();
        double nll = 0;
        for (int i = 0; i < cases.size(); i++) {
            List<Case> rest = new ArrayList<>(cases);
            Case c = rest.remove(i);
            double sd;
            double w;
            if (mechanicsOnly) {
                sd = profileSd(rest, 0);
                w = 0;
            } else {
                Fit f = fit(rest);
                sd = f.registrationSdMm();
                w = f.weight();
            }
            // a case stands for itself with its own fitted (s, w): shape weight folded into the case
            double[] cov = covariance(c, sd, w);
            left.add(new Case(c.seed(), c.errorMm(), cov, 1, new double[9]));
            nll += negLogLik(List.of(new Case(c.seed(), c.errorMm(), cov, 1, new double[9])), 0, 0);
        }
        return new Loo(check(left, 0, 0), nll);
    }

    /** Checks Σ(s, w) on the cases: d² against χ²₃(0.6827) and χ²₃(0.95). */
    static Check check(List<Case> cases, double sdMm, double weight) {
        double chi68 = Ellipsoid.chiSquare3(0.6827);
        double chi95 = Ellipsoid.chiSquare3(0.95);
        int in68 = 0;
        int in95 = 0;
        double sum = 0;
        for (Case c : cases) {
            double d2 = Coverage.mahalanobisSquared(c.errorMm(), covariance(c, sdMm, weight));
            in68 += d2 <= chi68 ? 1 : 0;
            in95 += d2 <= chi95 ? 1 : 0;
            sum += d2;
        }
        return new Check(cases.size(), in68, in95, cases.isEmpty() ? Double.NaN : sum / cases.size());
    }

    /**
     * Reads the hybrid rows of a calibration CSV (lines starting with '#' skipped); each needs the
     * mechanics-only (supine frame) row of the same seed and lesion before it.
     */
    static List<Case> read(Path csv, Shape shape) throws IOException {
        Table t = Table.read(csv);
        Map<String, Integer> col = t.col();
        for (String need : new String[] {"seed", "lesion", "method", "error_x_mm", "hyb_marking_xx_mm2",
                "hyb_mechanics_xx_mm2", "hyb_marking_weight"}) {
            if (!col.containsKey(need)) {
                throw new IOException(csv + ": header has no column '" + need + "' (a CSV of BenchCalibration "
                        + "with the hybrid covariance terms is expected)");
            }
        }
        // errors of the other methods, by seed/lesion (the registration-only row follows the hybrid one)
        Map<String, double[]> mechanicsError = new HashMap<>();
        Map<String, double[]> registrationError = new HashMap<>();
        for (String[] f : t.rows()) {
            String key = f[col.get("seed")] + "/" + f[col.get("lesion")];
            String method = f[col.get("method")];
            Map<String, double[]> to = BenchCalibration.MECHANICS_SUPINE.equals(method) ? mechanicsError
                    : PlanResult.REGISTRATION.equals(method) ? registrationError : null;
            if (to != null && !f[col.get("error_x_mm")].isEmpty()) {
                to.put(key, new double[] {num(f, col, "error_x_mm"), num(f, col, "error_y_mm"),
                        num(f, col, "error_z_mm")});
            }
        }
        List<Case> out = new ArrayList<>();
        for (int r = 0; r < t.rows().size(); r++) {
            String[] f = t.rows().get(r);
            String key = f[col.get("seed")] + "/" + f[col.get("lesion")];
            if (!PlanResult.HYBRID.equals(f[col.get("method")]) || f[col.get("hyb_marking_xx_mm2")].isEmpty()) {
                continue;
            }
            try {
                double[] e = {num(f, col, "error_x_mm"), num(f, col, "error_y_mm"), num(f, col, "error_z_mm")};
                double[] g;
                if (shape == Shape.MECHANICS) {
                    g = symmetric(f, col, "hyb_mechanics_");
                } else {
                    // δ = e_other − e_hybrid (e = truth − prediction)
                    double[] em = (shape == Shape.SPREAD ? registrationError : mechanicsError).get(key);
                    if (em == null) {
                        throw new IllegalArgumentException("no " + (shape == Shape.SPREAD ? "registration-only"
                                : "mechanics-only") + " row with an error for the hybrid row of " + key);
                    }
                    double d2 = 0;
                    for (int a = 0; a < 3; a++) {
                        d2 += (em[a] - e[a]) * (em[a] - e[a]);
                    }
                    g = new double[] {d2 / 3, 0, 0, 0, d2 / 3, 0, 0, 0, d2 / 3};
                }
                out.add(new Case(Long.parseLong(f[col.get("seed")]), e, symmetric(f, col, "hyb_marking_"),
                        num(f, col, "hyb_marking_weight"), g));
            } catch (RuntimeException ex) {
                throw new IOException(csv + " line " + t.lines().get(r) + ": " + ex.getMessage(), ex);
            }
        }
        return out;
    }

    /**
     * Reads the mechanics-only rows of one frame ({@link BenchCalibration#MECHANICS_SUPINE} or
     * {@link BenchCalibration#MECHANICS_PRONE}) of a calibration CSV with a covariance, as cases whose
     * marking term (weight 1) is the sampled covariance Σ_m: the row's covariance less the isotropic term
     * the plan added (column mech_model_sd_mm, in CSVs written before it mech_supine_sd_mm; 0 when the
     * column is absent or empty). Fit them with {@link #profileSd}(cases, 0).
     */
    static List<Case> readMechanics(Path csv, String method) throws IOException {
        Table t = Table.read(csv);
        Map<String, Integer> col = t.col();
        for (String need : new String[] {"seed", "method", "error_x_mm", "cov_xx_mm2"}) {
            if (!col.containsKey(need)) {
                throw new IOException(csv + ": header has no column '" + need + "' (a CSV of BenchCalibration "
                        + "is expected)");
            }
        }
        Integer sdCol = col.containsKey("mech_model_sd_mm") ? col.get("mech_model_sd_mm") : col.get("mech_supine_sd_mm");
        List<Case> out = new ArrayList<>();
        for (int r = 0; r < t.rows().size(); r++) {
            String[] f = t.rows().get(r);
            if (!method.equals(f[col.get("method")]) || f[col.get("cov_xx_mm2")].isEmpty()) {
                continue;
            }
            try {
                double[] e = {num(f, col, "error_x_mm"), num(f, col, "error_y_mm"), num(f, col, "error_z_mm")};
                double[] m = symmetric(f, col, "cov_");
                double sd = sdCol == null || sdCol >= f.length || f[sdCol].isEmpty() ? 0 : Double.parseDouble(f[sdCol]);
                m[0] -= sd * sd;
                m[4] -= sd * sd;
                m[8] -= sd * sd;
                Integer kCol = col.get("mech_model_scale");
                double k = kCol == null || kCol >= f.length || f[kCol].isEmpty() ? 1 : Double.parseDouble(f[kCol]);
                for (int q = 0; q < 9; q++) {
                    m[q] /= k;
                }
                out.add(new Case(Long.parseLong(f[col.get("seed")]), e, m, 1, new double[9]));
            } catch (RuntimeException ex) {
                throw new IOException(csv + " line " + t.lines().get(r) + ": " + ex.getMessage(), ex);
            }
        }
        return out;
    }

    /**
     * Standard error (mm) of the ML isotropic SD for a fixed shape weight: 1/√(∂²NLL/∂s²) by a central
     * second difference (observed information).
     */
    static double sdStandardError(List<Case> cases, double sdMm, double weight) {
        double h = 1e-3 * sdMm;
        double f2 = (negLogLik(cases, sdMm + h, weight) - 2 * negLogLik(cases, sdMm, weight)
                + negLogLik(cases, sdMm - h, weight)) / (h * h);
        return f2 > 0 ? 1 / Math.sqrt(f2) : Double.NaN;
    }

    /** Seed and d² (as the plan computed it) of every row of {@code method} with a d², from a calibration CSV. */
    static List<double[]> readD2(Path csv, String method) throws IOException {
        Table t = Table.read(csv);
        Map<String, Integer> col = t.col();
        List<double[]> out = new ArrayList<>();
        for (String[] f : t.rows()) {
            if (method.equals(f[col.get("method")]) && !f[col.get("d2")].isEmpty()) {
                out.add(new double[] {Long.parseLong(f[col.get("seed")]), num(f, col, "d2")});
            }
        }
        return out;
    }

    /**
     * A calibration CSV: column index by header name, the data rows, and each row's line number
     * (1-based, for messages); lines starting with '#' and blank lines are skipped.
     */
    record Table(Map<String, Integer> col, List<String[]> rows, List<Integer> lines) {

        static Table read(Path csv) throws IOException {
            List<String> text = Files.readAllLines(csv, StandardCharsets.UTF_8);
            Map<String, Integer> col = null;
            List<String[]> rows = new ArrayList<>();
            List<Integer> lines = new ArrayList<>();
            for (int ln = 0; ln < text.size(); ln++) {
                String line = text.get(ln);
                if (line.startsWith("#") || line.isBlank()) {
                    continue;
                }
                String[] f = line.split(",", -1);
                if (col == null) {
                    col = new HashMap<>();
                    for (int i = 0; i < f.length; i++) {
                        col.put(f[i], i);
                    }
                } else {
                    rows.add(f);
                    lines.add(ln + 1);
                }
            }
            if (col == null) {
                throw new IOException(csv + ": no header line");
            }
            return new Table(col, rows, lines);
        }
    }

    /** Coverage counts and mean d² of given d² values with seeds in a range. */
    static Check checkD2(List<double[]> seedD2, long[] range) {
        double chi68 = Ellipsoid.chiSquare3(0.6827);
        double chi95 = Ellipsoid.chiSquare3(0.95);
        int n = 0;
        int in68 = 0;
        int in95 = 0;
        double sum = 0;
        for (double[] r : seedD2) {
            if (r[0] >= range[0] && r[0] <= range[1]) {
                n++;
                in68 += r[1] <= chi68 ? 1 : 0;
                in95 += r[1] <= chi95 ? 1 : 0;
                sum += r[1];
            }
        }
        return new Check(n, in68, in95, n == 0 ? Double.NaN : sum / n);
    }

    private static double num(String[] f, Map<String, Integer> col, String name) {
        return Double.parseDouble(f[col.get(name)]);
    }

    private static double[] symmetric(String[] f, Map<String, Integer> col, String prefix) {
        double[] m = new double[9];
        for (int k = 0; k < BenchCalibration.SYMMETRIC.length; k++) {
            String name = prefix + BenchCalibration.SYMMETRIC_NAMES[k] + "_mm2";
            Integer i = col.get(name);
            if (i == null) {
                throw new IllegalArgumentException("no column " + name);
            }
            double v = Double.parseDouble(f[i]);
            int idx = BenchCalibration.SYMMETRIC[k];
            m[idx] = v;
            m[(idx % 3) * 3 + idx / 3] = v;
        }
        return m;
    }

    static double det3(double[] a) {
        return a[0] * (a[4] * a[8] - a[5] * a[7]) - a[1] * (a[3] * a[8] - a[5] * a[6])
                + a[2] * (a[3] * a[7] - a[4] * a[6]);
    }

    private static List<Case> select(List<Case> all, long[] range) {
        List<Case> out = new ArrayList<>();
        for (Case c : all) {
            if (c.seed() >= range[0] && c.seed() <= range[1]) {
                out.add(c);
            }
        }
        return out;
    }

    private static long[] range(String v) {
        String[] p = v.split("-");
        if (p.length != 2) {
            throw new IllegalArgumentException("a seed range FROM-TO is expected, got '" + v + "'");
        }
        return new long[] {Long.parseLong(p[0].trim()), Long.parseLong(p[1].trim())};
    }

    private static String row(String model, String set, Check c) {
        if (c.n() == 0) {
            return "| " + model + " | " + set + " | 0 | – | – | – | – | – |";
        }
        Coverage.Interval a = Coverage.clopperPearson(c.inside68(), c.n(), 0.95);
        Coverage.Interval b = Coverage.clopperPearson(c.inside95(), c.n(), 0.95);
        return String.format(Locale.ROOT, "| %s | %s | %d | %d / %d | %.1f %% (%.1f–%.1f %%) | %d / %d | %.1f %% "
                        + "(%.1f–%.1f %%) | %.2f |", model, set, c.n(), c.inside68(), c.n(), 100.0 * c.inside68() / c.n(),
                100 * a.lower(), 100 * a.upper(), c.inside95(), c.n(), 100.0 * c.inside95() / c.n(), 100 * b.lower(),
                100 * b.upper(), c.meanD2());
    }

    /** All cases of the CSV files, in order. */
    private static List<Case> readAll(List<Path> csvs, Shape shape) throws IOException {
        List<Case> out = new ArrayList<>();
        for (Path p : csvs) {
            out.addAll(read(p, shape));
        }
        return out;
    }

    private static List<double[]> readAllD2(List<Path> csvs, String method) throws IOException {
        List<double[]> out = new ArrayList<>();
        for (Path p : csvs) {
            out.addAll(readD2(p, method));
        }
        return out;
    }

    private static String name(long[] r, String role) {
        return "seeds " + r[0] + "–" + r[1] + " (" + role + ")";
    }

    public static void main(String[] args) throws IOException {
        List<Path> csvs = new ArrayList<>();
        long[] fitRange = null;
        List<long[]> checkRanges = new ArrayList<>();
        Shape shape = Shape.MECHANICS;
        double oldSd = 1.5;
        double oldWeight = 0.25;
        Double plannerSd = null;
        Double plannerWeight = null;
        Double plannerMechSd = null;
        Double plannerProneSd = null;
        long[] looRange = null;
        for (int i = 0; i + 1 < args.length; i += 2) {
            String v = args[i + 1];
            switch (args[i]) {
                case "--csv" -> {
                    for (String c : v.split(",")) {
                        csvs.add(Path.of(c));
                    }
                }
                case "--fit" -> fitRange = range(v);
                case "--check" -> {
                    for (String c : v.split(",")) {
                        checkRanges.add(range(c));
                    }
                }
                case "--shape" -> shape = Shape.valueOf(v.toUpperCase(Locale.ROOT));
                case "--compare-sd-mm" -> oldSd = Double.parseDouble(v);
                case "--compare-weight" -> oldWeight = Double.parseDouble(v);
                case "--planner-sd-mm" -> plannerSd = Double.parseDouble(v);
                case "--planner-weight" -> plannerWeight = Double.parseDouble(v);
                case "--planner-mech-sd-mm" -> plannerMechSd = Double.parseDouble(v);
                case "--planner-prone-sd-mm" -> plannerProneSd = Double.parseDouble(v);
                case "--loo" -> looRange = range(v);
                default -> throw new IllegalArgumentException("unknown option " + args[i]);
            }
        }
        if (!csvs.isEmpty() && looRange != null) {
            looReport(csvs, looRange);
            return;
        }
        if (csvs.isEmpty() || fitRange == null || checkRanges.isEmpty()) {
            System.err.println("usage: BenchCalibrationFit --csv FILE[,FILE...] --fit FROM-TO --check FROM-TO[,FROM-TO...] "
                    + "[--shape correction|mechanics|spread] [--compare-sd-mm 1.5 --compare-weight 0.25] "
                    + "[--planner-sd-mm S --planner-weight W] [--planner-mech-sd-mm S_M] [--planner-prone-sd-mm S_P] "
                    + "[--loo FROM-TO]");
            System.exit(2);
            return;
        }
        for (long[] c : checkRanges) {
            if (fitRange[1] >= c[0] && c[1] >= fitRange[0]) {
                throw new IllegalArgumentException("fit and check seed ranges overlap");
            }
        }
        List<Case> all = readAll(csvs, shape);
        List<Case> allM = readAll(csvs, Shape.MECHANICS);
        List<Case> fitSet = select(all, fitRange);
        Fit f = fit(fitSet);
        Fit fm = fit(select(allM, fitRange));
        String fitName = name(fitRange, "fit");
        System.out.println("# " + ResearchUse.SHORT);
        System.out.printf(Locale.ROOT, "%s: %d hybrid lesions from %s%n", fitName, fitSet.size(), csvs);
        Map<Shape, List<Case>> byShape = new java.util.EnumMap<>(Shape.class);
        Map<Shape, Fit> fits = new java.util.EnumMap<>(Shape.class);
        for (Shape sh : Shape.values()) {
            byShape.put(sh, sh == shape ? all : sh == Shape.MECHANICS ? allM : readAll(csvs, sh));
            fits.put(sh, sh == shape ? f : sh == Shape.MECHANICS ? fm : fit(select(byShape.get(sh), fitRange)));
            Fit x = fits.get(sh);
            System.out.printf(Locale.ROOT, "ML fit, G = %s: s = %.3f mm (SE %.3f mm), w = %.4f (SE %.4f); −log L = %.3f "
                            + "(+ 3/2 log 2π per lesion), AIC = %.2f%n", sh.symbol(), x.registrationSdMm(), x.sdSeMm(),
                    x.weight(), x.weightSe(), x.negLogLik(), 2 * x.negLogLik() + 4);
        }
        String[] frames = {BenchCalibration.MECHANICS_SUPINE, BenchCalibration.MECHANICS_PRONE};
        Double[] plannerFrameSd = {plannerMechSd, plannerProneSd};
        List<List<Case>> mechAll = new ArrayList<>();
        double[] sMech = new double[frames.length];
        for (int fr = 0; fr < frames.length; fr++) {
            List<Case> all1 = new ArrayList<>();
            for (Path p : csvs) {
                all1.addAll(readMechanics(p, frames[fr]));
            }
            mechAll.add(all1);
            List<Case> mechFit = select(all1, fitRange);
            if (mechFit.isEmpty()) {
                continue;
            }
            sMech[fr] = profileSd(mechFit, 0);
            System.out.printf(Locale.ROOT, "%s, %d lesions: ML fit Σ_m + s² I: s = %.3f mm (SE %.3f mm), −log L = %.3f "
                    + "(Σ_m alone: %.3f)%n", frames[fr], mechFit.size(), sMech[fr],
                    sdStandardError(mechFit, sMech[fr], 0), negLogLik(mechFit, sMech[fr], 0), negLogLik(mechFit, 0, 0));
        }
        double sIso = profileSd(fitSet, 0);
        System.out.printf(Locale.ROOT, "ML fit, w = 0: s = %.3f mm, −log L = %.3f, AIC = %.2f%n", sIso,
                negLogLik(fitSet, sIso, 0), 2 * negLogLik(fitSet, sIso, 0) + 2);
        System.out.println();
        System.out.println("| method / hybrid covariance | seeds | lesions | inside 68 % | 68 % coverage (95 % CI) "
                + "| inside 95 % | 95 % coverage (95 % CI) | mean d² (3 if calibrated) |");
        System.out.println("|---|---|---|---|---|---|---|---|");
        List<long[]> sets = new ArrayList<>();
        sets.add(fitRange);
        sets.addAll(checkRanges);
        String shapeName = shape.symbol();
        for (int k = 0; k < sets.size(); k++) {
            long[] r = sets.get(k);
            String n = name(r, k == 0 ? "fit" : "held out");
            List<Case> cs = select(all, r);
            List<Case> csM = select(allM, r);
            for (int fr = 0; fr < frames.length; fr++) {
                List<Case> ms = select(mechAll.get(fr), r);
                if (ms.isEmpty()) {
                    continue;
                }
                System.out.println(row(frames[fr] + ", as the plans computed it", n,
                        checkD2(readAllD2(csvs, frames[fr]), r)));
                System.out.println(row(frames[fr] + ", Σ_m alone", n, check(ms, 0, 0)));
                System.out.println(row(String.format(Locale.ROOT, "%s, ML fit: Σ_m + %.3f² I", frames[fr], sMech[fr]), n,
                        check(ms, sMech[fr], 0)));
                if (plannerFrameSd[fr] != null) {
                    System.out.println(row(String.format(Locale.ROOT, "%s, planner default: Σ_m + %s² I", frames[fr],
                            plannerFrameSd[fr]), n, check(ms, plannerFrameSd[fr], 0)));
                }
            }
            List<Case> withMarking = new ArrayList<>();
            for (Case c : csM) {
                withMarking.add(new Case(c.seed(), c.errorMm(), c.markingMm2(), 1, c.shapeMm2()));
            }
            System.out.println(row(String.format(Locale.ROOT, "hybrid, previous: K + %.2f² I + %.3f Σ_m", oldSd,
                    oldWeight), n, check(withMarking, oldSd, oldWeight)));
            System.out.println(row(String.format(Locale.ROOT, "hybrid, ML fit: a K + %.3f² I + %.4f Σ_m",
                    fm.registrationSdMm(), fm.weight()), n, check(csM, fm.registrationSdMm(), fm.weight())));
            for (Shape sh : new Shape[] {Shape.CORRECTION, Shape.SPREAD}) {
                Fit x = fits.get(sh);
                System.out.println(row(String.format(Locale.ROOT, "hybrid, ML fit: a K + %.3f² I + %.4f %s",
                        x.registrationSdMm(), x.weight(), sh.symbol()), n,
                        check(select(byShape.get(sh), r), x.registrationSdMm(), x.weight())));
            }
            if (plannerSd != null && plannerWeight != null) {
                // The planner's defaults (the fit rounded), marking weight as the plans used it.
                System.out.println(row(String.format(Locale.ROOT, "hybrid, planner defaults: s = %s mm, w = %s (G = %s)",
                        plannerSd, plannerWeight, shapeName), n, check(cs, plannerSd, plannerWeight)));
            }
        }
    }

    /**
     * Pooled fit and leave-one-out check of every hybrid shape and of both mechanics frames' isotropic
     * term, on the seeds of {@code range} (a table, for docs/benchmarks.md).
     */
    static void looReport(List<Path> csvs, long[] range) throws IOException {
        String n = name(range, "pooled");
        System.out.println("# " + ResearchUse.SHORT);
        System.out.println("| covariance | seeds | lesions | pooled ML fit | AIC | LOO −log L | LOO inside 68 % | "
                + "LOO inside 95 % (95 % CI) | LOO mean d² |");
        System.out.println("|---|---|---|---|---|---|---|---|---|");
        for (Shape sh : Shape.values()) {
            List<Case> cs = select(readAll(csvs, sh), range);
            Fit f = fit(cs);
            Loo l = leaveOneOut(cs, false);
            System.out.println(looRow(String.format(Locale.ROOT, "hybrid, a K + s² I + w %s", sh.symbol()), n, cs.size(),
                    String.format(Locale.ROOT, "s = %.3f mm (SE %.3f), w = %.4f (SE %.4f)", f.registrationSdMm(),
                            f.sdSeMm(), f.weight(), f.weightSe()), 2 * f.negLogLik() + 4, l));
        }
        for (String frame : new String[] {BenchCalibration.MECHANICS_SUPINE, BenchCalibration.MECHANICS_PRONE}) {
            List<Case> all1 = new ArrayList<>();
            for (Path p : csvs) {
                all1.addAll(readMechanics(p, frame));
            }
            List<Case> cs = select(all1, range);
            if (cs.isEmpty()) {
                continue;
            }
            double sd = profileSd(cs, 0);
            Loo l = leaveOneOut(cs, true);
            System.out.println(looRow(frame + ", Σ_m + s² I", n, cs.size(), String.format(Locale.ROOT,
                    "s = %.3f mm (SE %.3f)", sd, sdStandardError(cs, sd, 0)), 2 * negLogLik(cs, sd, 0) + 2, l));
            // the sampled covariance scaled up as well: (1 + w) Σ_m + s² I (Σ_m as the shape, weight w)
            List<Case> scaled = new ArrayList<>();
            for (Case c : cs) {
                scaled.add(new Case(c.seed(), c.errorMm(), c.markingMm2(), 1, c.markingMm2()));
            }
            Fit f = fit(scaled);
            Loo ls = leaveOneOut(scaled, false);
            System.out.println(looRow(frame + ", (1 + w) Σ_m + s² I", n, cs.size(), String.format(Locale.ROOT,
                    "s = %.3f mm (SE %.3f), w = %.4f (SE %.4f)", f.registrationSdMm(), f.sdSeMm(), f.weight(),
                    f.weightSe()), 2 * f.negLogLik() + 4, ls));
        }
    }

    private static String looRow(String what, String seeds, int lesions, String fit, double aic, Loo l) {
        Check c = l.check();
        Coverage.Interval ci95 = Coverage.clopperPearson(c.inside95(), c.n(), 0.95);
        return String.format(Locale.ROOT, "| %s | %s | %d | %s | %.2f | %.2f | %d / %d | %d / %d, %.1f %% (%.1f–%.1f %%) | %.2f |",
                what, seeds, lesions, fit, aic, l.negLogLik(), c.inside68(), c.n(), c.inside95(), c.n(),
                100.0 * c.inside95() / c.n(), 100 * ci95.lower(), 100 * ci95.upper(), c.meanD2());
    }
}
