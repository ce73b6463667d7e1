package org.turnmark.registration.resample;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;

class GaussianSmoothingTest {

    /**
     * Separable float passes vs a naive direct 3-D double sum: each of up to three passes rounds to
     * float (2^-24 ≈ 6e-8 relative) on values of order 1, so a few 1e-7; 1e-6 leaves margin.
     */
    private static final double FLOAT_PASS_TOLERANCE = 1e-6;

    private static float[] random(int n, long seed) {
        Random r = new Random(seed);
        float[] a = new float[n];
        for (int i = 0; i < n; i++) {
            a[i] = (float) (2 * r.nextDouble() - 1);
        }
        return a;
    }

    static int reflect(int m, int n) {
        while (m < 0 || m >= n) {
            m = m < 0 ? -m - 1 : 2 * n - 1 - m;
        }
        return m;
    }

    static double[] kernel(double sigma) {
        int r = (int) (4.0 * sigma + 0.5);
        double[] w = new double[2 * r + 1];
        double s = 0;
        for (int m = -r; m <= r; m++) {
            w[m + r] = Math.exp(-m * m / (2 * sigma * sigma));
            s += w[m + r];
        }
        for (int m = 0; m < w.length; m++) {
            w[m] /= s;
        }
        return w;
    }

    /** Naive: direct triple sum of the tensor-product kernel with reflected indices. */
    static double[] naive(float[] in, int nx, int ny, int nz, double sx, double sy, double sz) {
        double[] kx = sx > 0 ? kernel(sx) : new double[] {1};
        double[] ky = sy > 0 ? kernel(sy) : new double[] {1};
        double[] kz = sz > 0 ? kernel(sz) : new double[] {1};
        int rx = kx.length / 2;
        int ry = ky.length / 2;
        int rz = kz.length / 2;
        double[] out = new double[in.length];
        for (int k = 0; k < nz; k++) {
            for (int j = 0; j < ny; j++) {
                for (int i = 0; i < nx; i++) {
                    double s = 0;
                    for (int c = -rz; c <= rz; c++) {
                        for (int b = -ry; b <= ry; b++) {
                            for (int a = -rx; a <= rx; a++) {
                                s += kx[a + rx] * ky[b + ry] * kz[c + rz]
                                        * in[reflect(i + a, nx) + nx * (reflect(j + b, ny) + ny * reflect(k + c, nz))];
                            }
                        }
                    }
                    out[i + nx * (j + ny * k)] = s;
                }
            }
        }
        return out;
    }

    @Test
    void separableSmoothingMatchesNaiveDirectSumWithAnisotropicSpacingAndWideKernel() {
        int nx = 9;
        int ny = 7;
        int nz = 5;
        // spacing 0.8 x 1.5 x 2.5 mm, sigma 2 mm: 2.5, 1.33, 0.8 voxels; radius 10 exceeds nx (reflects twice)
        Grid3 g = Grid3.axisAligned(nx, ny, nz, 0.8, 1.5, 2.5, -3, 4, 5);
        float[] in = random(g.size(), 7);
        float[] out = new float[g.size()];
        GaussianSmoothing.smooth(in, out, g, 2.0);
        double[] ref = naive(in, nx, ny, nz, 2.0 / 0.8, 2.0 / 1.5, 2.0 / 2.5);
        for (int q = 0; q < ref.length; q++) {
            assertEquals(ref[q], out[q], FLOAT_PASS_TOLERANCE);
        }
        assertTrue(Math.abs(out[0] - in[0]) > 0.01, "smoothing must change the image");
    }

    @Test
    void inPlaceEqualsOutOfPlaceBitForBit() {
        Grid3 g = Grid3.axisAligned(11, 6, 5, 1, 1, 1, 0, 0, 0);
        float[] in = random(g.size(), 9);
        float[] out = new float[g.size()];
        GaussianSmoothing.smooth(in, out, g, 1.2, 0.0, 1.7);
        float[] same = in.clone();
        GaussianSmoothing.smooth(same, same, g, 1.2, 0.0, 1.7);
        assertArrayEquals(out, same);
    }

    @Test
    void parallelResultEqualsSequentialNaiveLoopBitForBit() {
        // Large enough for Parallel to split (above its threshold); the reference below runs the
        // same per-line arithmetic in a plain sequential loop.
        Grid3 g = Grid3.axisAligned(41, 37, 29, 1, 1, 1, 0, 0, 0);
        float[] in = random(g.size(), 13);
        float[] par = new float[g.size()];
        GaussianSmoothing.smooth(in, par, g, 1.5);
        double[] w = GaussianKernels.halfKernel(1.5, GaussianSmoothing.TRUNCATE_SIGMAS);
        float[] seq = in.clone();
        int[] n = {41, 37, 29};
        int[] stride = {1, 41, 41 * 37};
        for (int axis = 0; axis < 3; axis++) {
            float[] src = seq.clone();
            int r = w.length - 1;
            for (int q = 0; q < src.length; q++) {
                int c = (q / stride[axis]) % n[axis];
                int base = q - c * stride[axis];
                double s = w[0] * src[q];
                for (int m = 1; m <= r; m++) {
                    s += w[m] * ((double) src[base + stride[axis] * reflect(c - m, n[axis])]
                            + src[base + stride[axis] * reflect(c + m, n[axis])]);
                }
                seq[q] = (float) s;
            }
        }
        assertArrayEquals(seq, par);
    }

    @Test
    void constantImageStaysConstantAndZeroSigmaCopies() {
        Grid3 g = Grid3.axisAligned(5, 4, 3, 1, 2, 3, 0, 0, 0);
        float[] in = new float[g.size()];
        java.util.Arrays.fill(in, 3.25f);
        float[] out = new float[g.size()];
        GaussianSmoothing.smooth(in, out, g, 4.0);
        for (float v : out) {
            assertEquals(3.25, v, FLOAT_PASS_TOLERANCE);
        }
        float[] r = random(g.size(), 1);
        GaussianSmoothing.smooth(r, out, g, 0.0);
        assertArrayEquals(r, out);
    }

    @Test
    void vectorFieldComponentsAreSmoothedLikeScalars() {
        Grid3 g = Grid3.axisAligned(6, 5, 4, 1, 1, 1, 0, 0, 0);
        VectorField v = new VectorField(g, random(g.size(), 1), random(g.size(), 2), random(g.size(), 3));
        VectorField out = VectorField.zeros(g);
        GaussianSmoothing.smooth(v, out, 1.0);
        float[] y = new float[g.size()];
        GaussianSmoothing.smooth(v.y(), y, g, 1.0);
        assertArrayEquals(y, out.y());
    }

    @Test
    void invalidSigmaIsRejectedWithTheValue() {
        Grid3 g = Grid3.axisAligned(3, 3, 3, 1, 1, 1, 0, 0, 0);
        float[] a = new float[27];
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> GaussianSmoothing.smooth(a, a, g, -1.0));
        assertTrue(e.getMessage().contains("-1.0"), e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> GaussianSmoothing.smooth(a, a, g, 1.0, 2.0));
        assertThrows(IllegalArgumentException.class, () -> GaussianSmoothing.smooth(a, a, g, 1e12));
        assertThrows(IllegalArgumentException.class, () -> GaussianSmoothing.smooth(a, a, g, Double.NaN));
        assertThrows(IllegalArgumentException.class, () -> GaussianSmoothing.smooth(a, new float[26], g, 1.0));
    }
}
