package org.turnmark.registration.metric;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.concurrent.ForkJoinPool;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;

class MetricValueTest {

    private static final Grid3 GRID = Grid3.axisAligned(13, 9, 7, 1.0, 1.0, 2.0, 0, 0, 0);
    /** Both sides are double sums of the same float products; float window sums differ by ~1e-7. */
    private static final double NAIVE_TOL = 1e-5;

    /** Naive LNCC: explicit loops over each truncated box window, in double. */
    private static double naiveLncc(float[] f, float[] w, byte[] mask, int rx, int ry, int rz) {
        double total = 0;
        int count = 0;
        for (int k = 0; k < GRID.nz(); k++) {
            for (int j = 0; j < GRID.ny(); j++) {
                for (int i = 0; i < GRID.nx(); i++) {
                    if (mask[GRID.index(i, j, k)] == 0) {
                        continue;
                    }
                    double s1 = 0;
                    double sf = 0;
                    double sw = 0;
                    double sff = 0;
                    double sww = 0;
                    double sfw = 0;
                    for (int c = Math.max(0, k - rz); c <= Math.min(GRID.nz() - 1, k + rz); c++) {
                        for (int b = Math.max(0, j - ry); b <= Math.min(GRID.ny() - 1, j + ry); b++) {
                            for (int a = Math.max(0, i - rx); a <= Math.min(GRID.nx() - 1, i + rx); a++) {
                                int n = GRID.index(a, b, c);
                                if (mask[n] == 0) {
                                    continue;
                                }
                                s1++;
                                sf += f[n];
                                sw += w[n];
                                sff += (double) f[n] * f[n];
                                sww += (double) w[n] * w[n];
                                sfw += (double) f[n] * w[n];
                            }
                        }
                    }
                    double full = (2 * rx + 1) * (2 * ry + 1) * (2 * rz + 1);
                    if (s1 < LocalCorrelation.MIN_WINDOW_FRACTION * full) {
                        continue;
                    }
                    count++;
                    double cov = sfw - sf * sw / s1;
                    double vf = sff - sf * sf / s1;
                    double vw = sww - sw * sw / s1;
                    total += cov * cov / (vf * vw);
                }
            }
        }
        return -total / count;
    }

    @Test
    void lnccBoxMatchesNaiveWindowLoops() {
        float[] f = MetricTestImages.blobs(GRID, 11, 3.0);
        float[] w = MetricTestImages.blobs(GRID, 12, 3.0);
        byte[] mask = MetricTestImages.allInside(GRID.size());
        for (int n = 0; n < mask.length; n += 4) {
            mask[n] = 0;
        }
        LocalCorrelation m = new LocalCorrelation(GRID, 3.0, LnccWindow.BOX, IntensityRange.of(f, null, "f"),
                IntensityRange.of(w, null, "w"));
        int[] r = m.radiusVoxels();
        assertEquals(3, r[0]);
        assertEquals(LocalCorrelation.MIN_RADIUS_VOXELS, r[2], "3 mm on 2 mm slices rounds to 2 voxels");
        assertEquals(naiveLncc(f, w, mask, r[0], r[1], r[2]), m.cost(f, w, mask), NAIVE_TOL);
    }

    @Test
    void lnccOfAffinelyRelatedImagesIsMinusOne() {
        // Closed form: W = a·F + b gives cc = 1 in every window (Cauchy–Schwarz equality), cost −1.
        float[] f = MetricTestImages.blobs(GRID, 13, 3.0);
        float[] w = new float[f.length];
        for (int n = 0; n < f.length; n++) {
            w[n] = -0.7f * f[n] + 400f;
        }
        for (LnccWindow win : LnccWindow.values()) {
            LocalCorrelation m = new LocalCorrelation(GRID, 2.0, win, IntensityRange.of(f, null, "f"),
                    IntensityRange.of(w, null, "w"));
            assertEquals(-1.0, m.cost(f, w, MetricTestImages.allInside(f.length)), NAIVE_TOL, win.name());
        }
    }

    @Test
    void ssdIsMeanSquaredDifferenceInsideMask() {
        // Closed form on a hand-made case: differences 1 and 3 on the two mask voxels → (1 + 9)/2 = 5.
        float[] f = {1, 2, 3, 4};
        float[] w = {0, 2, 0, 100};
        byte[] mask = {1, 0, 1, 0};
        assertEquals(5.0, new SumOfSquaredDifferences().cost(f, w, mask), 0.0);
    }

    @Test
    void mutualInformationPrefersAlignedImages() {
        // Information theory: MI(F, g(F)) for a monotone g exceeds MI(F, G) for an unrelated G.
        float[] f = MetricTestImages.blobs(GRID, 21, 1.0);
        float[] related = new float[f.length];
        for (int n = 0; n < f.length; n++) {
            related[n] = (float) Math.sqrt(Math.max(0, f[n]));
        }
        float[] unrelated = MetricTestImages.blobs(GRID, 22, 1.0);
        byte[] all = MetricTestImages.allInside(f.length);
        MattesMutualInformation m1 = new MattesMutualInformation(24, IntensityRange.of(f, null, "f"),
                IntensityRange.of(related, null, "r"));
        MattesMutualInformation m2 = new MattesMutualInformation(24, IntensityRange.of(f, null, "f"),
                IntensityRange.of(unrelated, null, "u"));
        double aligned = m1.cost(f, related, all);
        double other = m2.cost(f, unrelated, all);
        assertTrue(aligned < other - 0.3, "MI cost aligned " + aligned + " vs unrelated " + other + " nats");
    }

    @Test
    void mutualInformationMatchesNaiveParzenHistogram() {
        float[] f = MetricTestImages.blobs(GRID, 31, 2.0);
        float[] w = MetricTestImages.blobs(GRID, 32, 2.0);
        IntensityRange rf = IntensityRange.of(f, null, "f");
        IntensityRange rw = IntensityRange.of(w, null, "w");
        int bins = 20;
        double[][] p = new double[bins][bins];
        for (int n = 0; n < f.length; n++) {
            double xf = (f[n] - rf.min()) * (bins - 5) / rf.width() + 2;
            double xw = (w[n] - rw.min()) * (bins - 5) / rw.width() + 2;
            int a = (int) Math.floor(xf + 0.5);
            for (int c = 0; c < bins; c++) {
                p[a][c] += MattesMutualInformation.bspline3(c - xw) / f.length;
            }
        }
        double mi = 0;
        double[] pf = new double[bins];
        double[] pw = new double[bins];
        for (int a = 0; a < bins; a++) {
            for (int c = 0; c < bins; c++) {
                pf[a] += p[a][c];
                pw[c] += p[a][c];
            }
        }
        for (int a = 0; a < bins; a++) {
            for (int c = 0; c < bins; c++) {
                if (p[a][c] > 0) {
                    mi += p[a][c] * Math.log(p[a][c] / (pf[a] * pw[c]));
                }
            }
        }
        double got = new MattesMutualInformation(bins, rf, rw).cost(f, w, MetricTestImages.allInside(f.length));
        assertEquals(-mi, got, 1e-12);
    }

    @Test
    void lnccIsBitIdenticalForAnyThreadCount() throws Exception {
        Grid3 big = Grid3.axisAligned(40, 40, 30, 1, 1, 1, 0, 0, 0);
        float[] f = MetricTestImages.blobs(big, 41, 2.0);
        float[] w = MetricTestImages.blobs(big, 42, 2.0);
        byte[] all = MetricTestImages.allInside(f.length);
        float[][] d = new float[2][f.length];
        double[] c = new double[2];
        int[] threads = {1, 3};
        for (int t = 0; t < 2; t++) {
            int slot = t;
            ForkJoinPool pool = new ForkJoinPool(threads[t]);
            try {
                pool.submit(() -> {
                    LocalCorrelation m = new LocalCorrelation(big, 3, LnccWindow.BOX, IntensityRange.of(f, null, "f"),
                            IntensityRange.of(w, null, "w"));
                    c[slot] = m.costAndDerivative(f, w, all, d[slot]);
                }).get();
            } finally {
                pool.shutdown();
            }
        }
        assertEquals(c[0], c[1], 0.0);
        assertTrue(java.util.Arrays.equals(d[0], d[1]), "derivatives differ between thread counts");
    }
}
