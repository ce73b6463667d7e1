package org.turnmark.registration.resample;

import org.turnmark.geom.Parallel;

/**
 * Separable Gaussian convolution passes behind {@link GaussianSmoothing}. Each pass reads a whole
 * line (or a whole plane of lines) into a reflected, padded {@code double} buffer before writing, so
 * a pass may run in place. Blocks are z-slices (x and y passes) and y-rows (z pass), fixed by the
 * grid alone: results are bit-identical for any thread count.
 */
final class GaussianKernels {

    private GaussianKernels() {
    }

    /**
     * Half kernel {@code w[0..r]} of the normalised sampled Gaussian
     * {@code w[m] = exp(-m²/(2σ²)) / sum_{|m|<=r} exp(-m²/(2σ²))}, radius
     * {@code r = (int) (truncate·σ + 0.5)}.
     */
    static double[] halfKernel(double sigmaVoxels, double truncate) {
        int r = (int) (truncate * sigmaVoxels + 0.5);
        double[] w = new double[r + 1];
        double sum = 0;
        for (int m = 0; m <= r; m++) {
            w[m] = Math.exp(-0.5 * m * m / (sigmaVoxels * sigmaVoxels));
            sum += m == 0 ? w[m] : 2 * w[m];
        }
        for (int m = 0; m <= r; m++) {
            w[m] /= sum;
        }
        return w;
    }

    /** Half-sample symmetric reflection of {@code m} into [0, n): -1 → 0, n → n-1 (period 2n). */
    static int reflect(int m, int n) {
        if (m >= 0 && m < n) {
            return m;
        }
        int p = 2 * n;
        int r = m % p;
        if (r < 0) {
            r += p;
        }
        return r < n ? r : p - 1 - r;
    }

    /** Convolves along x: {@code out[i] = sum_m w[|m|] in[reflect(i+m)]}. out may alias in. */
    static void passX(float[] in, float[] out, int nx, int ny, int nz, double[] w) {
        final int r = w.length - 1;
        final int plane = nx * ny;
        Parallel.forEachBlock(nz, (long) plane * nz * (r + 1), k -> {
            double[] buf = Scratch.get(0, nx + 2 * r);
            double[] acc = Scratch.get(1, nx);
            for (int j = 0; j < ny; j++) {
                int row = nx * j + plane * k;
                for (int p = 0; p < r; p++) {
                    buf[p] = in[row + reflect(p - r, nx)];
                    buf[nx + r + p] = in[row + reflect(nx + p, nx)];
                }
                for (int i = 0; i < nx; i++) {
                    buf[r + i] = in[row + i];
                }
                // Tap-outer, voxel-inner order: the inner loop is a plain axpy the JIT vectorises
                // (about 1.5x faster than a per-voxel tap loop).
                double w0 = w[0];
                for (int i = 0; i < nx; i++) {
                    acc[i] = w0 * buf[r + i];
                }
                for (int m = 1; m <= r; m++) {
                    double wm = w[m];
                    int lo = r - m;
                    int hi = r + m;
                    for (int i = 0; i < nx; i++) {
                        acc[i] += wm * (buf[lo + i] + buf[hi + i]);
                    }
                }
                for (int i = 0; i < nx; i++) {
                    out[row + i] = (float) acc[i];
                }
            }
        });
    }

    /** Convolves along y, one z-slice per block, whole rows at once for cache locality. */
    static void passY(float[] in, float[] out, int nx, int ny, int nz, double[] w) {
        final int r = w.length - 1;
        final int plane = nx * ny;
        Parallel.forEachBlock(nz, (long) plane * nz * (r + 1), k -> {
            int len = ny + 2 * r;
            double[] buf = Scratch.get(0, len * nx);
            double[] acc = Scratch.get(1, nx);
            int base = plane * k;
            for (int p = 0; p < len; p++) {
                int src = base + nx * reflect(p - r, ny);
                int dst = p * nx;
                for (int i = 0; i < nx; i++) {
                    buf[dst + i] = in[src + i];
                }
            }
            convolveRows(buf, acc, out, nx, ny, w, base, nx);
        });
    }

    /** Convolves along z, one y-row per block (all x of that row at once). */
    static void passZ(float[] in, float[] out, int nx, int ny, int nz, double[] w) {
        final int r = w.length - 1;
        final int plane = nx * ny;
        Parallel.forEachBlock(ny, (long) plane * nz * (r + 1), j -> {
            int len = nz + 2 * r;
            double[] buf = Scratch.get(0, len * nx);
            double[] acc = Scratch.get(1, nx);
            int base = nx * j;
            for (int p = 0; p < len; p++) {
                int src = base + plane * reflect(p - r, nz);
                int dst = p * nx;
                for (int i = 0; i < nx; i++) {
                    buf[dst + i] = in[src + i];
                }
            }
            convolveRows(buf, acc, out, nx, nz, w, base, plane);
        });
    }

    /**
     * {@code out[base + q*stride + i] = sum_m w[|m|] buf[(q + r + m)*nx + i]} for q in [0, n):
     * the padded buffer holds n + 2r rows of nx values.
     */
    private static void convolveRows(double[] buf, double[] acc, float[] out, int nx, int n, double[] w,
                                     int base, int stride) {
        final int r = w.length - 1;
        for (int q = 0; q < n; q++) {
            int c = (q + r) * nx;
            double w0 = w[0];
            for (int i = 0; i < nx; i++) {
                acc[i] = w0 * buf[c + i];
            }
            for (int m = 1; m <= r; m++) {
                double wm = w[m];
                int lo = c - m * nx;
                int hi = c + m * nx;
                for (int i = 0; i < nx; i++) {
                    acc[i] += wm * (buf[lo + i] + buf[hi + i]);
                }
            }
            int o = base + q * stride;
            for (int i = 0; i < nx; i++) {
                out[o + i] = (float) acc[i];
            }
        }
    }
}
