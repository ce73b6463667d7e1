package org.turnmark.app.uncertainty;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.junit.jupiter.api.Test;

class PriorDesignTest {

    private static final PriorDesign.Spec SPEC = new PriorDesign.Spec(new double[] {0.3, 0.4, 19, 1.6},
            new double[] {1.6, 1.6, 1.5, 2.0}, 0.45, 0.495, 0.7, 3.0);

    @Test
    void firstSobolPointIsTheCentreOfThePriors() {
        PriorDesign.Sample s = new PriorDesign(SPEC).samples(1, "sobol", 0).get(0);
        assertEquals(0.3, s.muKpa()[0], 1e-12);
        assertEquals(1.6, s.muKpa()[3], 1e-12);
        assertEquals(0.4725, s.nu(), 1e-12);
        assertTrue(s.sliding(), "u = 0.5 < P(sliding) = 0.7");
        assertEquals(0.0, s.gravityRollDeg(), 1e-12);
    }

    @Test
    void logNormalMapsOneSigmaToMedianTimesGsd() {
        double[] u = new double[PriorDesign.DIMENSIONS];
        java.util.Arrays.fill(u, 0.5);
        u[0] = 0.8413447460685429; // Φ(1), standard normal table (Abramowitz & Stegun 26.2)
        u[6] = 0.8413447460685429;
        PriorDesign.Sample s = new PriorDesign(SPEC).map(u);
        assertEquals(0.3 * 1.6, s.muKpa()[0], 1e-9);
        assertEquals(3.0, s.gravityRollDeg(), 1e-9);
    }

    @Test
    void latinHypercubeHasOnePointPerStratumInEveryDimension() {
        int n = 10;
        List<PriorDesign.Sample> ss = new PriorDesign(SPEC).samples(n, "latin-hypercube", 42);
        for (int d = 0; d < PriorDesign.DIMENSIONS; d++) {
            boolean[] seen = new boolean[n];
            for (PriorDesign.Sample s : ss) {
                int cell = (int) Math.floor(s.u()[d] * n);
                assertFalse(seen[cell], "dimension " + d + " stratum " + cell + " hit twice");
                seen[cell] = true;
            }
        }
    }

    @Test
    void designsAreDeterministicForASeed() {
        List<PriorDesign.Sample> a = new PriorDesign(SPEC).samples(5, "latin-hypercube", 3);
        List<PriorDesign.Sample> b = new PriorDesign(SPEC).samples(5, "latin-hypercube", 3);
        for (int i = 0; i < 5; i++) {
            assertEquals(a.get(i).nu(), b.get(i).nu(), 0.0);
        }
    }

    @Test
    void chestWallFrequencyFollowsThePrior() {
        // Sobol points are equidistributed: of the first 63, the fraction with u < 0.7 is within
        // the star discrepancy (≤ 1/32 for the first dimension block) of 0.7.
        List<PriorDesign.Sample> ss = new PriorDesign(SPEC).samples(63, "sobol", 0);
        long sliding = ss.stream().filter(PriorDesign.Sample::sliding).count();
        assertEquals(0.7, sliding / 63.0, 1.0 / 32 + 1.0 / 63);
    }

    @Test
    void sensitivityRecoversALinearResponse() {
        // x = 5 z_fat along R, −2 z_nu along A, nothing else: effects 5 and 2 mm per SD, exact fit.
        List<PriorDesign.Sample> ss = new PriorDesign(SPEC).samples(16, "sobol", 0);
        String[] names = new String[PriorDesign.DIMENSIONS];
        for (PriorDesign.Parameter p : PriorDesign.Parameter.values()) {
            names[p.ordinal()] = p.key();
        }
        double[][] scores = new double[ss.size()][];
        double[][] pos = new double[ss.size()][];
        for (int i = 0; i < ss.size(); i++) {
            scores[i] = ss.get(i).score();
            pos[i] = new double[] {5 * scores[i][0], -2 * scores[i][4], 0};
        }
        Sensitivity.Ranking r = Sensitivity.rank(names, scores, pos);
        assertEquals("mu_fat", r.effects().get(0).parameter());
        assertEquals("nu", r.effects().get(1).parameter());
        assertEquals(1.0, r.explainedVariance(), 1e-9);
        // The effect is per sample SD of the score: 5 × sd(z_fat) over these 16 points.
        double m = 0;
        double v = 0;
        for (double[] s : scores) {
            m += s[0] / 16;
        }
        for (double[] s : scores) {
            v += (s[0] - m) * (s[0] - m) / 15;
        }
        assertEquals(5 * Math.sqrt(v), r.effects().get(0).effectMm(), 1e-9);
        assertTrue(r.effects().get(2).effectMm() < 1e-9);
    }
}
