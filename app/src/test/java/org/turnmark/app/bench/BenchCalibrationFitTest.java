package org.turnmark.app.bench;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class BenchCalibrationFitTest {

    /** Seeded synthetic data: the same draws every run. */
    private static final long SEED = 20261202L;
    /** Lesions in the synthetic recovery test: enough for standard errors of a few per cent. */
    private static final int N = 1000;
    /** True parameters of the synthetic data (of the order the calibration run finds). */
    private static final double TRUE_SD_MM = 1.2;
    private static final double TRUE_WEIGHT = 0.06;
    /**
     * An ML estimate lies within 4 of its standard errors of the truth except with probability ≈ 6e-5
     * (normal tail; asymptotic normality of ML estimates).
     */
    private static final double SE_BAND = 4;
    /** The fit must resolve the parameters: standard errors below this fraction of the true value. */
    private static final double MAX_RELATIVE_SE = 0.15;
    /**
     * Mean d² at the optimum: Brent's method locates a minimum only to about √ε ≈ 1e-8 (relative) and mean
     * d² moves in proportion to the parameter error; 1e-4 leaves a wide margin.
     */
    private static final double STATIONARY_TOL = 1e-4;
    /** 25 / 3 from a sum of three squares divided by 3: a few units in the last place. */
    private static final double SUM_ULPS = 1e-12;
    /** Brent tolerances are 1e-10; the closed form is matched far inside this. */
    private static final double CLOSED_FORM_REL_TOL = 1e-6;

    @Test
    void isotropicProfileMatchesTheClosedForm() {
        // Zero-mean isotropic Gaussian, M = 0: the ML variance is Σ|e|² / (3N) (closed form, from memory:
        // d/ds² of N·3/2 log s² + Σ|e|²/(2 s²) vanishes there).
        Random r = new Random(SEED);
        List<BenchCalibrationFit.Case> cases = new ArrayList<>();
        double sum = 0;
        for (int i = 0; i < 50; i++) {
            double[] e = {2 * r.nextGaussian(), 2 * r.nextGaussian(), 2 * r.nextGaussian()};
            sum += e[0] * e[0] + e[1] * e[1] + e[2] * e[2];
            cases.add(new BenchCalibrationFit.Case(i, e, new double[9], 0, new double[9]));
        }
        double expected = Math.sqrt(sum / (3 * cases.size()));
        assertEquals(expected, BenchCalibrationFit.profileSd(cases, 0), CLOSED_FORM_REL_TOL * expected);
    }

    /**
     * Leave-one-out: each lesion is checked against the fit to the others. Isotropic case (w = 0, closed
     * form as above): left-out lesion i has d² = |e_i|² / s_(−i)² with s_(−i)² = Σ_(j≠i) |e_j|² / (3(N − 1)),
     * and its −log L term ½(3 log s_(−i)² + d²); the sums are compared to that hand computation.
     */
    @Test
    void leaveOneOutChecksEachLesionAgainstTheFitToTheOthers() {
        Random r = new Random(SEED + 7);
        List<BenchCalibrationFit.Case> cases = new ArrayList<>();
        double[] sq = new double[20];
        double total = 0;
        for (int i = 0; i < sq.length; i++) {
            double[] e = {1.5 * r.nextGaussian(), 1.5 * r.nextGaussian(), 1.5 * r.nextGaussian()};
            sq[i] = e[0] * e[0] + e[1] * e[1] + e[2] * e[2];
            total += sq[i];
            cases.add(new BenchCalibrationFit.Case(i, e, new double[9], 0, new double[9]));
        }
        double chi95 = org.turnmark.app.uncertainty.Ellipsoid.chiSquare3(0.95);
        int inside = 0;
        double sumD2 = 0;
        double nll = 0;
        for (int i = 0; i < sq.length; i++) {
            double v = (total - sq[i]) / (3.0 * (sq.length - 1));
            double d2 = sq[i] / v;
            inside += d2 <= chi95 ? 1 : 0;
            sumD2 += d2;
            nll += 0.5 * (3 * Math.log(v) + d2);
        }
        BenchCalibrationFit.Loo loo = BenchCalibrationFit.leaveOneOut(cases, true);
        assertEquals(sq.length, loo.check().n());
        assertEquals(inside, loo.check().inside95());
        // the profile's Brent tolerance (1e-10 relative on log s) carries into d² at about that size
        assertEquals(sumD2 / sq.length, loo.check().meanD2(), CLOSED_FORM_REL_TOL * sumD2 / sq.length);
        assertEquals(nll, loo.negLogLik(), CLOSED_FORM_REL_TOL * Math.abs(nll));
    }

    @Test
    void recoversKnownParametersFromSyntheticGaussianErrors() {
        Random r = new Random(SEED);
        List<BenchCalibrationFit.Case> cases = new ArrayList<>();
        for (int i = 0; i < N; i++) {
            // An elongated mechanics covariance in a random orientation (long axis 10–15 mm SD, like the plans).
            double[] lambda = {100 + 125 * r.nextDouble(), 1 + 5 * r.nextDouble(), 1 + 5 * r.nextDouble()};
            double[] q = rotation(r);
            double[] m = new double[9];
            for (int a = 0; a < 3; a++) {
                for (int b = 0; b < 3; b++) {
                    double v = 0;
                    for (int k = 0; k < 3; k++) {
                        v += q[a * 3 + k] * lambda[k] * q[b * 3 + k];
                    }
                    m[a * 3 + b] = v;
                }
            }
            double[] marking = {2, 0, 0, 0, 2, 0, 0, 0, 2};
            BenchCalibrationFit.Case shape = new BenchCalibrationFit.Case(i, null, marking, 0, m);
            double[] l = cholesky(BenchCalibrationFit.covariance(shape, TRUE_SD_MM, TRUE_WEIGHT));
            double[] z = {r.nextGaussian(), r.nextGaussian(), r.nextGaussian()};
            double[] e = {l[0] * z[0], l[3] * z[0] + l[4] * z[1], l[6] * z[0] + l[7] * z[1] + l[8] * z[2]};
            cases.add(new BenchCalibrationFit.Case(i, e, marking, 0, m));
        }
        BenchCalibrationFit.Fit f = BenchCalibrationFit.fit(cases);
        assertTrue(f.sdSeMm() < MAX_RELATIVE_SE * TRUE_SD_MM, "SE of s " + f.sdSeMm());
        assertTrue(f.weightSe() < MAX_RELATIVE_SE * TRUE_WEIGHT, "SE of w " + f.weightSe());
        assertEquals(TRUE_SD_MM, f.registrationSdMm(), SE_BAND * f.sdSeMm());
        assertEquals(TRUE_WEIGHT, f.weight(), SE_BAND * f.weightSe());
        // The maximum likelihood is at least as high as at the true parameters.
        assertTrue(f.negLogLik() <= BenchCalibrationFit.negLogLik(cases, TRUE_SD_MM, TRUE_WEIGHT));
        // Σ = s² I + w M is linear in (s², w), so scaling both by c scales Σ by c; the likelihood's derivative
        // along that direction vanishes at an interior optimum, which gives mean d² = 3 exactly on the fit data
        // (closed form: d/dc of Σ (3 log c + d²/c) = 0 at c = 1).
        assertEquals(3, BenchCalibrationFit.check(cases, f.registrationSdMm(), f.weight()).meanD2(),
                STATIONARY_TOL);
    }

    @Test
    void readsTheHybridRowsOfABenchCalibrationCsv(@TempDir Path dir) throws Exception {
        StringBuilder b = new StringBuilder("# caution\n# note\nseed,lesion,method,error_x_mm,error_y_mm,error_z_mm");
        for (String p : new String[] {"hyb_marking_", "hyb_mechanics_"}) {
            for (String n : BenchCalibration.SYMMETRIC_NAMES) {
                b.append(',').append(p).append(n).append("_mm2");
            }
        }
        b.append(",hyb_marking_weight\n");
        b.append("3,L1,mechanics-only (supine frame),4,6,3,,,,,,,,,,,,,\n");
        b.append("3,L1,hybrid,1,2,3,1,2,3,0.1,0.2,0.3,10,20,30,1,2,3,0\n");
        // the registration-only row follows the hybrid one, as BenchCalibration writes them
        b.append("3,L1,registration-only,1,-4,15,,,,,,,,,,,,,\n");
        Path csv = dir.resolve("c.csv");
        Files.writeString(csv, b);
        List<BenchCalibrationFit.Case> cases = BenchCalibrationFit.read(csv, BenchCalibrationFit.Shape.MECHANICS);
        assertEquals(1, cases.size());
        BenchCalibrationFit.Case c = cases.get(0);
        assertEquals(3, c.seed());
        // Row-major symmetric: xx yy zz xy xz yz → [0] [4] [8] [1]=[3] [2]=[6] [5]=[7].
        double[] k = c.markingMm2();
        assertEquals(1, k[0]);
        assertEquals(2, k[4]);
        assertEquals(3, k[8]);
        assertEquals(0.1, k[1]);
        assertEquals(0.1, k[3]);
        assertEquals(0.2, k[2]);
        assertEquals(0.2, k[6]);
        assertEquals(0.3, k[5]);
        assertEquals(0.3, k[7]);
        assertEquals(20, c.shapeMm2()[4]);
        assertEquals(3, c.shapeMm2()[7]);
        // Correction shape: δ = e_mechanics − e_hybrid = (3, 4, 0) mm, |δ|² / 3 = 25 / 3 mm² on the diagonal.
        double[] g = BenchCalibrationFit.read(csv, BenchCalibrationFit.Shape.CORRECTION).get(0).shapeMm2();
        assertEquals(25.0 / 3, g[0], SUM_ULPS);
        assertEquals(25.0 / 3, g[4], SUM_ULPS);
        assertEquals(25.0 / 3, g[8], SUM_ULPS);
        assertEquals(0, g[1]);
        // Spread shape: ρ = e_registration − e_hybrid = (0, −6, 12) mm, |ρ|² / 3 = 180 / 3 = 60 mm².
        double[] sp = BenchCalibrationFit.read(csv, BenchCalibrationFit.Shape.SPREAD).get(0).shapeMm2();
        assertEquals(60, sp[0], SUM_ULPS);
        assertEquals(60, sp[8], SUM_ULPS);
        assertEquals(0, sp[5]);
        assertEquals(1, BenchCalibrationFit.read(csv, BenchCalibrationFit.Shape.SPREAD).size(),
                "the registration-only row is not read as a case");
    }

    @Test
    void recoversTheMechanicsSupineSdFromSyntheticGaussianErrors() {
        // e ~ N(0, Σ_m + s_m² I) with an elongated Σ_m per lesion, as the mechanics-only rows are modelled.
        Random r = new Random(SEED + 1);
        double trueSd = 1.1;
        List<BenchCalibrationFit.Case> cases = new ArrayList<>();
        for (int i = 0; i < N; i++) {
            double[] lambda = {4 + 20 * r.nextDouble(), 0.5 + 2 * r.nextDouble(), 0.2 + r.nextDouble()};
            double[] q = rotation(r);
            double[] m = new double[9];
            for (int a = 0; a < 3; a++) {
                for (int b = 0; b < 3; b++) {
                    for (int k = 0; k < 3; k++) {
                        m[a * 3 + b] += q[a * 3 + k] * lambda[k] * q[b * 3 + k];
                    }
                }
            }
            BenchCalibrationFit.Case shape = new BenchCalibrationFit.Case(i, null, m, 1, new double[9]);
            double[] l = cholesky(BenchCalibrationFit.covariance(shape, trueSd, 0));
            double[] z = {r.nextGaussian(), r.nextGaussian(), r.nextGaussian()};
            double[] e = {l[0] * z[0], l[3] * z[0] + l[4] * z[1], l[6] * z[0] + l[7] * z[1] + l[8] * z[2]};
            cases.add(new BenchCalibrationFit.Case(i, e, m, 1, new double[9]));
        }
        double s = BenchCalibrationFit.profileSd(cases, 0);
        double se = BenchCalibrationFit.sdStandardError(cases, s, 0);
        assertTrue(se < MAX_RELATIVE_SE * trueSd, "SE " + se);
        assertEquals(trueSd, s, SE_BAND * se);
        // Σ_m alone is too narrow for these errors: mean d² above 3, and the fit brings it closer to 3.
        double alone = BenchCalibrationFit.check(cases, 0, 0).meanD2();
        double fitted = BenchCalibrationFit.check(cases, s, 0).meanD2();
        assertTrue(alone > 3.3 && Math.abs(fitted - 3) < Math.abs(alone - 3), alone + " vs " + fitted);
    }

    @Test
    void readsTheMechanicsRowsLessTheIsotropicTermThePlanAdded(@TempDir Path dir) throws Exception {
        Path csv = mechanicsCsv(dir.resolve("m.csv"), "mech_supine_sd_mm",
                "5,L1,mechanics-only (supine frame),1,2,3,10,20,30,1,2,3,2",
                "5,L1,hybrid,1,2,3,1,1,1,0,0,0,",
                "6,L1,mechanics-only (supine frame),1,2,3,10,20,30,1,2,3,");
        List<BenchCalibrationFit.Case> cases = BenchCalibrationFit.readMechanics(csv, BenchCalibration.MECHANICS_SUPINE);
        assertEquals(2, cases.size(), "the hybrid row is not a mechanics case");
        double[] m = cases.get(0).markingMm2();
        // 2 mm recorded: 2² = 4 mm² off the diagonal entries only
        assertEquals(6, m[0]);
        assertEquals(16, m[4]);
        assertEquals(26, m[8]);
        assertEquals(1, m[1]);
        assertEquals(3, m[7]);
        assertEquals(1, cases.get(0).markingWeight());
        assertEquals(3, cases.get(0).errorMm()[2]);
        // no recorded term (an older CSV row): the covariance as written
        assertEquals(10, cases.get(1).markingMm2()[0]);
        assertEquals(6, cases.get(1).seed());
    }

    /** The prone-frame rows are read on their own, less the term in the newer column mech_model_sd_mm. */
    @Test
    void readsTheProneFrameRowsWithTheNewerColumn(@TempDir Path dir) throws Exception {
        Path csv = mechanicsCsv(dir.resolve("p.csv"), "mech_model_sd_mm",
                "5,L1,mechanics-only (supine frame),1,2,3,10,20,30,1,2,3,2",
                "5,L1,mechanics-only (prone frame),4,5,6,10,20,30,1,2,3,1");
        List<BenchCalibrationFit.Case> prone = BenchCalibrationFit.readMechanics(csv, BenchCalibration.MECHANICS_PRONE);
        assertEquals(1, prone.size());
        assertEquals(4, prone.get(0).errorMm()[0]);
        assertEquals(9, prone.get(0).markingMm2()[0], "1 mm recorded: 1 mm² off the diagonal");
        List<BenchCalibrationFit.Case> supine = BenchCalibrationFit.readMechanics(csv, BenchCalibration.MECHANICS_SUPINE);
        assertEquals(6, supine.get(0).markingMm2()[0], "2 mm recorded: 4 mm² off the diagonal");
    }

    /** Prone-frame rows written with a factor on the sampled covariance are read back divided by it. */
    @Test
    void readsTheProneFrameRowsDividedByTheirScale(@TempDir Path dir) throws Exception {
        StringBuilder b = new StringBuilder("# caution\nseed,lesion,method,error_x_mm,error_y_mm,error_z_mm");
        for (String n : BenchCalibration.SYMMETRIC_NAMES) {
            b.append(",cov_").append(n).append("_mm2");
        }
        b.append(",mech_model_sd_mm,mech_model_scale\n");
        // written as k Σ_m + s² I with k = 2, s = 1 mm: Σ_m = diag(4.5, 9.5, 14.5), off-diagonals halved
        b.append("5,L1,mechanics-only (prone frame),4,5,6,10,20,30,1,2,3,1,2\n");
        b.append("5,L1,mechanics-only (supine frame),4,5,6,10,20,30,1,2,3,1,1\n");
        Path csv = dir.resolve("k.csv");
        Files.writeString(csv, b);
        double[] m = BenchCalibrationFit.readMechanics(csv, BenchCalibration.MECHANICS_PRONE).get(0).markingMm2();
        assertEquals(4.5, m[0]);
        assertEquals(9.5, m[4]);
        assertEquals(14.5, m[8]);
        assertEquals(0.5, m[1]);
        assertEquals(9, BenchCalibrationFit.readMechanics(csv, BenchCalibration.MECHANICS_SUPINE).get(0).markingMm2()[0],
                "a factor of 1 leaves the row as it was");
    }

    /** A minimal calibration CSV: errors, the six covariance entries and the given isotropic-term column. */
    private static Path mechanicsCsv(Path csv, String sdColumn, String... rows) throws java.io.IOException {
        StringBuilder b = new StringBuilder("# caution\nseed,lesion,method,error_x_mm,error_y_mm,error_z_mm");
        for (String n : BenchCalibration.SYMMETRIC_NAMES) {
            b.append(",cov_").append(n).append("_mm2");
        }
        b.append(',').append(sdColumn).append('\n');
        for (String r : rows) {
            b.append(r).append('\n');
        }
        Files.writeString(csv, b);
        return csv;
    }

    /** A random rotation (QR-free: Gram–Schmidt of three Gaussian vectors), row-major. */
    private static double[] rotation(Random r) {
        double[][] v = new double[3][3];
        for (int i = 0; i < 3; i++) {
            for (int k = 0; k < 3; k++) {
                v[i][k] = r.nextGaussian();
            }
            for (int j = 0; j < i; j++) {
                double d = v[i][0] * v[j][0] + v[i][1] * v[j][1] + v[i][2] * v[j][2];
                for (int k = 0; k < 3; k++) {
                    v[i][k] -= d * v[j][k];
                }
            }
            double n = Math.sqrt(v[i][0] * v[i][0] + v[i][1] * v[i][1] + v[i][2] * v[i][2]);
            for (int k = 0; k < 3; k++) {
                v[i][k] /= n;
            }
        }
        // Columns are the orthonormal vectors.
        return new double[] {v[0][0], v[1][0], v[2][0], v[0][1], v[1][1], v[2][1], v[0][2], v[1][2], v[2][2]};
    }

    /** Lower Cholesky factor of a 3×3 SPD matrix, row-major. */
    private static double[] cholesky(double[] a) {
        double[] l = new double[9];
        for (int i = 0; i < 3; i++) {
            for (int j = 0; j <= i; j++) {
                double s = a[i * 3 + j];
                for (int k = 0; k < j; k++) {
                    s -= l[i * 3 + k] * l[j * 3 + k];
                }
                l[i * 3 + j] = i == j ? Math.sqrt(s) : s / l[j * 3 + j];
            }
        }
        return l;
    }
}
