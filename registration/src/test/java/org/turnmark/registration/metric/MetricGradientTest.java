package org.turnmark.registration.metric;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;

/**
 * Each metric's analytic derivative ∂cost/∂W(x) against central finite differences of its own cost
 * (reference: the definition of the derivative, error O(h²)).
 */
class MetricGradientTest {

    private static final Grid3 GRID = Grid3.axisAligned(11, 10, 9, 1.2, 1.0, 1.5, -5, 3, 7);
    /** Voxels probed: interior, edge and corner, so that truncated windows are covered. */
    private static final int[][] PROBES = {{5, 5, 4}, {0, 0, 0}, {10, 3, 8}, {2, 9, 1}, {7, 1, 6}};

    /**
     * Relative agreement with central differences. The costs are sums in double of float data; the
     * window sums of LNCC are stored as float (relative rounding 6e-8 of sums ≈ 10–100 after
     * normalisation), which puts a noise of ~1e-8 on a cost difference of ~1e-5: 1e-2 relative covers it
     * with margin while a wrong term (factor 2, missing window) is off by ≥ 30 %.
     */
    private static final double REL_TOL = 1e-2;
    /** Absolute floor for probes whose derivative is near zero (cost units per intensity unit). */
    private static final double ABS_TOL = 1e-7;

    private static void checkGradient(SimilarityMetric m, float[] f, float[] w, byte[] mask, double h) {
        float[] d = new float[f.length];
        m.costAndDerivative(f, w, mask, d);
        int nonZero = 0;
        for (int[] p : PROBES) {
            int n = GRID.index(p[0], p[1], p[2]);
            float keep = w[n];
            w[n] = (float) (keep + h);
            double plus = m.cost(f, w, mask);
            w[n] = (float) (keep - h);
            double minus = m.cost(f, w, mask);
            w[n] = keep;
            double fd = (plus - minus) / (2 * h);
            assertEquals(fd, d[n], REL_TOL * Math.abs(fd) + ABS_TOL, m.kind() + " derivative at " + p[0] + ","
                    + p[1] + "," + p[2]);
            if (Math.abs(fd) > 10 * ABS_TOL) {
                nonZero++;
            }
        }
        assertTrue(nonZero >= 3, "the probes must see non-zero derivatives (non-trivial case)");
    }

    @Test
    void ssdDerivativeMatchesFiniteDifferences() {
        float[] f = MetricTestImages.blobs(GRID, 1, 1.0);
        float[] w = MetricTestImages.blobs(GRID, 2, 1.0);
        checkGradient(new SumOfSquaredDifferences(), f, w, MetricTestImages.allInside(GRID.size()), 0.5);
    }

    @Test
    void lnccBoxDerivativeMatchesFiniteDifferences() {
        float[] f = MetricTestImages.blobs(GRID, 3, 2.0);
        float[] w = MetricTestImages.blobs(GRID, 4, 2.0);
        IntensityRange rf = IntensityRange.of(f, null, "fixed");
        IntensityRange rw = IntensityRange.of(w, null, "moving");
        LocalCorrelation m = new LocalCorrelation(GRID, 2.5, LnccWindow.BOX, rf, rw);
        checkGradient(m, f, w, MetricTestImages.allInside(GRID.size()), 0.5);
    }

    @Test
    void lnccBoxDerivativeHoldsWithPartialMask() {
        float[] f = MetricTestImages.blobs(GRID, 5, 2.0);
        float[] w = MetricTestImages.blobs(GRID, 6, 2.0);
        byte[] mask = MetricTestImages.allInside(GRID.size());
        for (int n = 0; n < mask.length; n += 3) {
            mask[n] = 0;
        }
        for (int[] p : PROBES) {
            mask[GRID.index(p[0], p[1], p[2])] = 1;
        }
        LocalCorrelation m = new LocalCorrelation(GRID, 2.5, LnccWindow.BOX, IntensityRange.of(f, null, "f"),
                IntensityRange.of(w, null, "w"));
        checkGradient(m, f, w, mask, 0.5);
    }

    @Test
    void mutualInformationDerivativeMatchesFiniteDifferences() {
        float[] f = MetricTestImages.blobs(GRID, 7, 3.0);
        float[] w = MetricTestImages.blobs(GRID, 8, 3.0);
        // Ranges a little wider than the data so the probes never clamp.
        MattesMutualInformation m = new MattesMutualInformation(16, new IntensityRange(-20, 250),
                new IntensityRange(-20, 250));
        checkGradient(m, f, w, MetricTestImages.allInside(GRID.size()), 0.05);
    }

    @Test
    void emptyMaskIsAnErrorForEveryMetric() {
        float[] f = MetricTestImages.blobs(GRID, 1, 1.0);
        byte[] none = new byte[GRID.size()];
        IntensityRange r = IntensityRange.of(f, null, "f");
        SimilarityMetric[] all = {new SumOfSquaredDifferences(), new LocalCorrelation(GRID, 2, LnccWindow.BOX, r, r),
            new MattesMutualInformation(32, r, r)};
        for (SimilarityMetric m : all) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> m.cost(f, f, none));
            assertTrue(e.getMessage().contains("no voxel"), e.getMessage());
        }
    }

    @Test
    void constantImageHasNoUsableRange() {
        float[] c = new float[GRID.size()];
        java.util.Arrays.fill(c, 7f);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> IntensityRange.of(c, null, "supine.nii.gz"));
        assertTrue(e.getMessage().contains("supine.nii.gz") && e.getMessage().contains("constant"), e.getMessage());
    }
}
