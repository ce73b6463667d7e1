package org.turnmark.registration.resample;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;

class InterpolationTest {

    /**
     * Optimised vs naive kernels differ only in summation order: a few ulps of values of order 1
     * (samples in [-1, 1], sums of at most 64 terms with weights summing to 1).
     */
    private static final double NAIVE_TOLERANCE = 1e-12;

    /**
     * Coefficients are stored as float: relative round-off 2^-24 ≈ 6e-8 per coefficient, times the
     * sum of |weights| (1 for B-spline weights) and coefficient magnitude ≤ ~5 for samples in
     * [-1, 1] (sqrt(3)^3 gain bound of the prefilter), plus the naive double solve: 1e-6 is ~3× that.
     */
    private static final double FLOAT_COEFFICIENT_TOLERANCE = 1e-6;

    private static float[] random(int n, long seed) {
        Random r = new Random(seed);
        float[] a = new float[n];
        for (int i = 0; i < n; i++) {
            a[i] = (float) (2 * r.nextDouble() - 1);
        }
        return a;
    }

    /** Naive trilinear: sum over the 8 corners of the tensor-product hat weights. */
    private static double naiveLinear(float[] d, int nx, int ny, int nz, double x, double y, double z) {
        double s = 0;
        for (int k = (int) Math.floor(z); k <= (int) Math.floor(z) + 1; k++) {
            for (int j = (int) Math.floor(y); j <= (int) Math.floor(y) + 1; j++) {
                for (int i = (int) Math.floor(x); i <= (int) Math.floor(x) + 1; i++) {
                    double w = Math.max(0, 1 - Math.abs(x - i)) * Math.max(0, 1 - Math.abs(y - j))
                            * Math.max(0, 1 - Math.abs(z - k));
                    if (w != 0) {
                        s += w * d[i + nx * (j + ny * k)];
                    }
                }
            }
        }
        return s;
    }

    static double beta3(double t) {
        double a = Math.abs(t);
        if (a < 1) {
            return 2.0 / 3 - a * a + a * a * a / 2;
        }
        if (a < 2) {
            double u = 2 - a;
            return u * u * u / 6;
        }
        return 0;
    }

    static int mirror(int m, int n) {
        if (n == 1) {
            return 0;
        }
        while (m < 0 || m >= n) {
            m = m < 0 ? -m : 2 * (n - 1) - m;
        }
        return m;
    }

    /**
     * Naive 1-D prefilter: solve sum_m c[mirror(m)] beta3(i - m) = f[i] as a dense n×n system by
     * Gaussian elimination with partial pivoting.
     */
    static double[] naiveCoefficients1d(double[] f) {
        int n = f.length;
        double[][] a = new double[n][n + 1];
        for (int i = 0; i < n; i++) {
            for (int m = i - 2; m <= i + 2; m++) {
                a[i][mirror(m, n)] += beta3(i - m);
            }
            a[i][n] = f[i];
        }
        for (int c = 0; c < n; c++) {
            int p = c;
            for (int r = c + 1; r < n; r++) {
                if (Math.abs(a[r][c]) > Math.abs(a[p][c])) {
                    p = r;
                }
            }
            double[] t = a[c];
            a[c] = a[p];
            a[p] = t;
            for (int r = 0; r < n; r++) {
                if (r != c) {
                    double g = a[r][c] / a[c][c];
                    for (int q = c; q <= n; q++) {
                        a[r][q] -= g * a[c][q];
                    }
                }
            }
        }
        double[] x = new double[n];
        for (int i = 0; i < n; i++) {
            x[i] = a[i][n] / a[i][i];
        }
        return x;
    }

    static double[] naiveCoefficients3d(float[] d, int nx, int ny, int nz) {
        double[] c = new double[d.length];
        for (int q = 0; q < d.length; q++) {
            c[q] = d[q];
        }
        int[] n = {nx, ny, nz};
        int[] stride = {1, nx, nx * ny};
        for (int axis = 0; axis < 3; axis++) {
            int len = n[axis];
            for (int q = 0; q < d.length; q++) {
                int coord = (q / stride[axis]) % len;
                if (coord != 0) {
                    continue;
                }
                double[] line = new double[len];
                for (int t = 0; t < len; t++) {
                    line[t] = c[q + t * stride[axis]];
                }
                double[] s = len == 1 ? line : naiveCoefficients1d(line);
                for (int t = 0; t < len; t++) {
                    c[q + t * stride[axis]] = s[t];
                }
            }
        }
        return c;
    }

    /** Naive spline evaluation: sum over a wide window of c[mirror(m)] beta3(x - m). */
    static double naiveCubic(double[] c, int nx, int ny, int nz, double x, double y, double z) {
        double s = 0;
        for (int k = (int) Math.floor(z) - 3; k <= (int) Math.floor(z) + 3; k++) {
            for (int j = (int) Math.floor(y) - 3; j <= (int) Math.floor(y) + 3; j++) {
                for (int i = (int) Math.floor(x) - 3; i <= (int) Math.floor(x) + 3; i++) {
                    double w = beta3(x - i) * beta3(y - j) * beta3(z - k);
                    if (w != 0) {
                        s += w * c[mirror(i, nx) + nx * (mirror(j, ny) + ny * mirror(k, nz))];
                    }
                }
            }
        }
        return s;
    }

    @Test
    void linearMatchesNaiveInsideIncludingEdgesOnOddSizes() {
        int nx = 7;
        int ny = 5;
        int nz = 3;
        float[] d = random(nx * ny * nz, 11);
        Random r = new Random(12);
        for (int t = 0; t < 2000; t++) {
            double x = r.nextDouble() * (nx - 1);
            double y = r.nextDouble() * (ny - 1);
            double z = r.nextDouble() * (nz - 1);
            if (t % 5 == 0) {
                x = nx - 1; // exactly on the last centre
            }
            if (t % 7 == 0) {
                z = 0;
            }
            assertEquals(naiveLinear(d, nx, ny, nz, x, y, z),
                    Interpolation.linear(d, nx, ny, nz, x, y, z, Outside.FAIL, 0), NAIVE_TOLERANCE);
        }
    }

    @Test
    void linearReproducesSamplesAtVoxelCentres() {
        int nx = 5;
        int ny = 4;
        int nz = 3;
        float[] d = random(nx * ny * nz, 2);
        for (int k = 0; k < nz; k++) {
            for (int j = 0; j < ny; j++) {
                for (int i = 0; i < nx; i++) {
                    assertEquals(d[i + nx * (j + ny * k)], Interpolation.linear(d, nx, ny, nz, i, j, k, Outside.FAIL, 0), 0.0);
                }
            }
        }
    }

    @Test
    void singletonAxesAreConstantAlongThatAxis() {
        float[] d = {1, 3, 5};
        // 3x1x1 grid: y and z coordinates must be exactly 0.
        assertEquals(2.0, Interpolation.linear(d, 3, 1, 1, 0.5, 0, 0, Outside.FAIL, 0), 0.0);
        assertEquals(5.0, Interpolation.linear(d, 3, 1, 1, 2, 0, 0, Outside.FAIL, 0), 0.0);
        assertEquals(5.0, Interpolation.linear(d, 3, 1, 1, 2.0, 0.7, -3, Outside.CLAMP, 0), 0.0);
    }

    @Test
    void outsidePoliciesFollowTheirDefinition() {
        int nx = 4;
        int ny = 3;
        int nz = 2;
        float[] d = random(nx * ny * nz, 5);
        assertEquals(-7.5, Interpolation.linear(d, nx, ny, nz, -0.01, 1, 0.5, Outside.CONSTANT, -7.5), 0.0);
        assertEquals(-7.5, Interpolation.linear(d, nx, ny, nz, 1, 1, 1.001, Outside.CONSTANT, -7.5), 0.0);
        assertEquals(Interpolation.linear(d, nx, ny, nz, 0, 2, 0.25, Outside.FAIL, 0),
                Interpolation.linear(d, nx, ny, nz, -5, 9, 0.25, Outside.CLAMP, 0), 0.0);
        OutsideGridException e = assertThrows(OutsideGridException.class,
                () -> Interpolation.linear(d, nx, ny, nz, 3.5, 0, 0, Outside.FAIL, 0));
        assertEquals(3.5, e.i(), 0.0);
        assertTrue(e.getMessage().contains("4x3x2"), e.getMessage());
        assertThrows(OutsideGridException.class,
                () -> Interpolation.linear(d, nx, ny, nz, Double.NaN, 0, 0, Outside.CONSTANT, 0));
        assertThrows(OutsideGridException.class,
                () -> Interpolation.cubic(d, nx, ny, nz, 0, Double.NaN, 0, Outside.CLAMP, 0));
        assertEquals(0.0, Interpolation.nearest(d, nx, ny, nz, 0, 0, Double.POSITIVE_INFINITY, Outside.CONSTANT, 0), 0.0);
    }

    @Test
    void nearestPicksTheClosestVoxelAndRoundsHalvesUp() {
        int nx = 3;
        int ny = 3;
        int nz = 3;
        float[] d = new float[27];
        for (int q = 0; q < 27; q++) {
            d[q] = q;
        }
        assertEquals(1 + 3 * (2 + 3 * 1), Interpolation.nearest(d, nx, ny, nz, 0.5, 1.6, 1.49, Outside.FAIL, 0), 0.0);
        assertEquals(26, Interpolation.nearest(d, nx, ny, nz, 2, 2, 2, Outside.FAIL, 0), 0.0);
    }

    @Test
    void recursivePrefilterMatchesDenseSolveOnOddSizesIncludingTwoAndOne() {
        int[][] sizes = {{7, 5, 3}, {2, 3, 1}, {1, 1, 4}, {9, 2, 2}};
        for (int[] s : sizes) {
            float[] d = random(s[0] * s[1] * s[2], 31 + s[0]);
            float[] c = Interpolation.bsplineCoefficients(d, s[0], s[1], s[2]);
            double[] ref = naiveCoefficients3d(d, s[0], s[1], s[2]);
            for (int q = 0; q < d.length; q++) {
                assertEquals(ref[q], c[q], FLOAT_COEFFICIENT_TOLERANCE, "size " + s[0] + "x" + s[1] + "x" + s[2]);
            }
        }
    }

    @Test
    void cubicMatchesNaiveSplineSumAndInterpolatesSamples() {
        int nx = 7;
        int ny = 5;
        int nz = 4;
        float[] d = random(nx * ny * nz, 41);
        float[] c = Interpolation.bsplineCoefficients(d, nx, ny, nz);
        double[] cd = new double[c.length];
        for (int q = 0; q < c.length; q++) {
            cd[q] = c[q];
        }
        Random r = new Random(42);
        for (int t = 0; t < 1000; t++) {
            double x = t % 3 == 0 ? nx - 1 : r.nextDouble() * (nx - 1);
            double y = r.nextDouble() * (ny - 1);
            double z = t % 4 == 0 ? 0 : r.nextDouble() * (nz - 1);
            assertEquals(naiveCubic(cd, nx, ny, nz, x, y, z),
                    Interpolation.cubic(c, nx, ny, nz, x, y, z, Outside.FAIL, 0), NAIVE_TOLERANCE);
        }
        for (int q = 0; q < d.length; q += 3) {
            int i = q % nx;
            int j = (q / nx) % ny;
            int k = q / (nx * ny);
            assertEquals(d[q], Interpolation.cubic(c, nx, ny, nz, i, j, k, Outside.FAIL, 0), FLOAT_COEFFICIENT_TOLERANCE);
        }
    }

    @Test
    void cubicReproducesAConstantImageEverywhere() {
        // Closed form: B-spline weights sum to 1 and the prefilter maps a constant to itself.
        int nx = 21;
        int ny = 3;
        int nz = 3;
        float[] d = new float[nx * ny * nz];
        java.util.Arrays.fill(d, 2.5f);
        float[] c = Interpolation.bsplineCoefficients(d, nx, ny, nz);
        assertEquals(2.5, Interpolation.cubic(c, nx, ny, nz, 3.3, 1.2, 0.7, Outside.FAIL, 0), FLOAT_COEFFICIENT_TOLERANCE);
        assertEquals(2.5, Interpolation.cubic(c, nx, ny, nz, 20, 2, 0, Outside.FAIL, 0), FLOAT_COEFFICIENT_TOLERANCE);
    }

    @Test
    void parallelPrefilterEqualsSequentialLineByLineLoopBitForBit() {
        // Above Parallel's threshold, so the blocks may run on several threads.
        int nx = 41;
        int ny = 37;
        int nz = 29;
        float[] d = random(nx * ny * nz, 77);
        float[] par = Interpolation.bsplineCoefficients(d, nx, ny, nz);
        // Sequential reference: x then y lines of each slice in double, rounded to float, then z lines.
        float[] seq = d.clone();
        int plane = nx * ny;
        double[] line = new double[Math.max(nx, Math.max(ny, nz))];
        for (int k = 0; k < nz; k++) {
            double[] s = new double[plane];
            for (int q = 0; q < plane; q++) {
                s[q] = seq[k * plane + q];
            }
            for (int j = 0; j < ny; j++) {
                System.arraycopy(s, j * nx, line, 0, nx);
                BSplinePrefilter.filterLine(line, nx);
                System.arraycopy(line, 0, s, j * nx, nx);
            }
            for (int i = 0; i < nx; i++) {
                for (int j = 0; j < ny; j++) {
                    line[j] = s[i + j * nx];
                }
                BSplinePrefilter.filterLine(line, ny);
                for (int j = 0; j < ny; j++) {
                    seq[k * plane + i + j * nx] = (float) line[j];
                }
            }
        }
        for (int j = 0; j < ny; j++) {
            for (int i = 0; i < nx; i++) {
                for (int k = 0; k < nz; k++) {
                    line[k] = seq[i + j * nx + k * plane];
                }
                BSplinePrefilter.filterLine(line, nz);
                for (int k = 0; k < nz; k++) {
                    seq[i + j * nx + k * plane] = (float) line[k];
                }
            }
        }
        org.junit.jupiter.api.Assertions.assertArrayEquals(seq, par);
    }

    @Test
    void pointSamplingAllocatesNothing() {
        int nx = 9;
        int ny = 8;
        int nz = 7;
        float[] d = random(nx * ny * nz, 3);
        float[] c = Interpolation.bsplineCoefficients(d, nx, ny, nz);
        com.sun.management.ThreadMXBean mx =
                (com.sun.management.ThreadMXBean) java.lang.management.ManagementFactory.getThreadMXBean();
        double sink = 0;
        for (int warm = 0; warm < 2; warm++) {
            long before = mx.getCurrentThreadAllocatedBytes();
            for (int t = 0; t < 100_000; t++) {
                double x = (t % 97) * 0.1 - 0.5;
                double y = (t % 89) * 0.08;
                double z = (t % 83) * 0.075;
                sink += Interpolation.nearest(d, nx, ny, nz, x, y, z, Outside.CLAMP, 0)
                        + Interpolation.linear(d, nx, ny, nz, x, y, z, Outside.CONSTANT, 0)
                        + Interpolation.cubic(c, nx, ny, nz, x, y, z, Outside.CLAMP, 0);
            }
            long allocated = mx.getCurrentThreadAllocatedBytes() - before;
            if (warm == 1) {
                // 300 000 samples: any per-sample allocation (boxing, arrays) would be >= 4.8 MB.
                assertTrue(allocated < 64 * 1024, "sampling allocated " + allocated + " bytes");
            }
        }
        assertTrue(Double.isFinite(sink));
    }
}
