package org.turnmark.app.uncertainty;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.apache.commons.math3.stat.inference.KolmogorovSmirnovTest;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.junit.jupiter.api.Test;

/**
 * Random draws from the priors ({@link PriorDesign#draw}) follow the stated distributions: checked by
 * sample moments against the spec (the expected values are the definitions of the distributions:
 * log-normal with ln μ ~ N(ln median, (ln gsd)²), uniform ν, Bernoulli chest wall, normal angles) with
 * tolerances of {@link #K} standard errors, and by a Kolmogorov–Smirnov test of ln μ against the
 * normal distribution (Commons Math, an outside reference for the statistics).
 */
class PriorDrawTest {

    /** The planner's default priors (docs/case-format.md), written out here as numbers. */
    private static final PriorDesign.Spec SPEC = new PriorDesign.Spec(new double[] {0.3, 0.4, 19, 1.6},
            new double[] {1.6, 1.6, 1.5, 2.0}, 0.45, 0.495, 0.7, 3.0);
    /** Draws per test: standard errors of a few per cent or less. */
    private static final int N = 4000;
    /**
     * Tolerance in standard errors: a correct sampler fails one such two-sided check with probability
     * 6e−5 (normal tail); the draws are seeded, so the test is deterministic anyway.
     */
    private static final double K = 4;
    /**
     * Relative tolerance of a sample standard deviation: its standard error is σ/√(2N) = 1.1 % of σ
     * for N = 4000 (normal data), and 4 of those are 4.5 %; 5 % allowed.
     */
    private static final double SD_REL_TOL = 0.05;
    /** KS test significance: reject the normal law of ln μ only below this p-value. */
    private static final double KS_ALPHA = 1e-3;

    /** N draws from the spec with a fixed seed, as columns. */
    private static final Draws DRAWS = new Draws();

    private static final class Draws {
        final double[][] lnMu = new double[4][N];
        final double[] nu = new double[N];
        final double[] roll = new double[N];
        final double[] pitch = new double[N];
        final int sliding;

        Draws() {
            PriorDesign design = new PriorDesign(SPEC);
            SplittableRandom rng = new SplittableRandom(20261202L);
            int sl = 0;
            for (int i = 0; i < N; i++) {
                PriorDesign.Sample s = design.draw(rng);
                for (int t = 0; t < 4; t++) {
                    lnMu[t][i] = Math.log(s.muKpa()[t]);
                }
                nu[i] = s.nu();
                roll[i] = s.gravityRollDeg();
                pitch[i] = s.gravityPitchDeg();
                sl += s.sliding() ? 1 : 0;
            }
            sliding = sl;
        }
    }

    @Test
    void stiffnessIsLogNormalWithTheSpecsMedianAndGsd() {
        KolmogorovSmirnovTest ks = new KolmogorovSmirnovTest();
        for (int t = 0; t < 4; t++) {
            double mu = Math.log(SPEC.muMedianKpa()[t]);
            double sigma = Math.log(SPEC.muGeometricSd()[t]);
            double[] x = DRAWS.lnMu[t];
            assertEquals(mu, mean(x), K * sigma / Math.sqrt(N), "mean of ln mu, tissue " + t);
            assertEquals(sigma, sd(x), SD_REL_TOL * sigma, "SD of ln mu, tissue " + t);
            double p = ks.kolmogorovSmirnovTest(new NormalDistribution(null, mu, sigma), x);
            assertTrue(p > KS_ALPHA, "ln mu of tissue " + t + " is not normal: KS p = " + p);
        }
    }

    @Test
    void poissonRatioIsUniformOnTheSpecsRange() {
        double lo = SPEC.nuMin();
        double hi = SPEC.nuMax();
        for (double v : DRAWS.nu) {
            assertTrue(v >= lo && v <= hi, "nu " + v + " outside [" + lo + ", " + hi + "]");
        }
        // Uniform on [lo, hi]: mean (lo + hi)/2, SD (hi − lo)/√12.
        double nuSd = (hi - lo) / Math.sqrt(12);
        assertEquals(0.5 * (lo + hi), mean(DRAWS.nu), K * nuSd / Math.sqrt(N), "mean of nu");
        assertEquals(nuSd, sd(DRAWS.nu), SD_REL_TOL * nuSd, "SD of nu");
    }

    @Test
    void chestWallSlidesWithTheSpecsProbability() {
        // Bernoulli(p): standard error √(p(1 − p)/N).
        double p = SPEC.slidingProbability();
        assertEquals(p, DRAWS.sliding / (double) N, K * Math.sqrt(p * (1 - p) / N), "sliding fraction");
    }

    @Test
    void gravityAnglesAreCentredNormalsWithTheSpecsSd() {
        double g = SPEC.gravitySdDeg();
        assertEquals(0, mean(DRAWS.roll), K * g / Math.sqrt(N), "mean roll");
        assertEquals(0, mean(DRAWS.pitch), K * g / Math.sqrt(N), "mean pitch");
        assertEquals(g, sd(DRAWS.roll), SD_REL_TOL * g, "SD of roll");
        assertEquals(g, sd(DRAWS.pitch), SD_REL_TOL * g, "SD of pitch");
    }

    @Test
    void drawIsTheMapOfUniformNumbersFromTheGivenSource() {
        PriorDesign design = new PriorDesign(SPEC);
        PriorDesign.Sample a = design.draw(new SplittableRandom(7));
        SplittableRandom r = new SplittableRandom(7);
        double[] u = new double[PriorDesign.DIMENSIONS];
        for (int d = 0; d < u.length; d++) {
            u[d] = r.nextDouble();
        }
        PriorDesign.Sample b = design.map(u);
        assertArrayEquals(b.u(), a.u(), 0.0);
        assertArrayEquals(b.muKpa(), a.muKpa(), 0.0);
        assertEquals(b.nu(), a.nu(), 0.0);
        assertEquals(b.sliding(), a.sliding());
        assertEquals(b.gravityRollDeg(), a.gravityRollDeg(), 0.0);
        assertEquals(b.gravityPitchDeg(), a.gravityPitchDeg(), 0.0);
        // Deterministic for a seed, also through java.util.Random.
        PriorDesign.Sample c = design.draw(new java.util.Random(11));
        PriorDesign.Sample d = design.draw(new java.util.Random(11));
        assertArrayEquals(c.u(), d.u(), 0.0);
    }

    private static double mean(double[] x) {
        double s = 0;
        for (double v : x) {
            s += v;
        }
        return s / x.length;
    }

    private static double sd(double[] x) {
        double m = mean(x);
        double s = 0;
        for (double v : x) {
            s += (v - m) * (v - m);
        }
        return Math.sqrt(s / (x.length - 1));
    }
}
