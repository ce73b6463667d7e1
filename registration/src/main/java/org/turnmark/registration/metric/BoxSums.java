package org.turnmark.registration.metric;

import org.turnmark.geom.Parallel;

/**
 * In-place separable box sums {@code out(x) = Σ_{|y_a − x_a| ≤ r_a} a(y)} over the window truncated at
 * the grid border (voxels outside the grid contribute nothing), computed along each axis from prefix
 * sums in double (O(1) per voxel whatever the radius). The truncated box is symmetric
 * (y ∈ window(x) ⇔ x ∈ window(y)), which the correlation gradient relies on.
 *
 * <p>Parallel over rows / slices with a fixed partition; bit-identical for any thread count.
 */
final class BoxSums {

    /** Per-thread prefix-sum buffer, reused across calls (the sums run ten times per iteration). */
    private static final ThreadLocal<double[]> SCRATCH = ThreadLocal.withInitial(() -> new double[0]);

    private BoxSums() {
    }

    /** A buffer of at least n doubles owned by the calling thread; the first {@code zeroed} are set to 0. */
    private static double[] scratch(int n, int zeroed) {
        double[] b = SCRATCH.get();
        if (b.length < n) {
            b = new double[n];
            SCRATCH.set(b);
        }
        java.util.Arrays.fill(b, 0, zeroed, 0.0);
        return b;
    }

    static void boxSum(float[] a, int nx, int ny, int nz, int rx, int ry, int rz) {
        if (rx > 0) {
            passX(a, nx, ny, nz, rx);
        }
        if (ry > 0) {
            passY(a, nx, ny, nz, ry);
        }
        if (rz > 0) {
            passZ(a, nx, ny, nz, rz);
        }
    }

    private static void passX(float[] a, int nx, int ny, int nz, int r) {
        Parallel.forEachBlock(nz, (long) nx * ny * nz, k -> {
            double[] p = scratch(nx + 1, 1);
            for (int j = 0; j < ny; j++) {
                int row = nx * (j + ny * k);
                for (int i = 0; i < nx; i++) {
                    p[i + 1] = p[i] + a[row + i];
                }
                for (int i = 0; i < nx; i++) {
                    int lo = Math.max(0, i - r);
                    int hi = Math.min(nx - 1, i + r);
                    a[row + i] = (float) (p[hi + 1] - p[lo]);
                }
            }
        });
    }

    private static void passY(float[] a, int nx, int ny, int nz, int r) {
        Parallel.forEachBlock(nz, (long) nx * ny * nz, k -> {
            // p[(j)*nx + i] = Σ_{t<j} a(i, t, k); rows walked with i fastest for cache.
            double[] p = scratch((ny + 1) * nx, nx);
            int base = nx * ny * k;
            for (int j = 0; j < ny; j++) {
                int src = base + nx * j;
                int pj = j * nx;
                for (int i = 0; i < nx; i++) {
                    p[pj + nx + i] = p[pj + i] + a[src + i];
                }
            }
            for (int j = 0; j < ny; j++) {
                int lo = Math.max(0, j - r) * nx;
                int hi = (Math.min(ny - 1, j + r) + 1) * nx;
                int dst = base + nx * j;
                for (int i = 0; i < nx; i++) {
                    a[dst + i] = (float) (p[hi + i] - p[lo + i]);
                }
            }
        });
    }

    private static void passZ(float[] a, int nx, int ny, int nz, int r) {
        int slice = nx * ny;
        Parallel.forEachBlock(ny, (long) nx * ny * nz, j -> {
            double[] p = scratch((nz + 1) * nx, nx);
            for (int k = 0; k < nz; k++) {
                int src = nx * j + slice * k;
                int pk = k * nx;
                for (int i = 0; i < nx; i++) {
                    p[pk + nx + i] = p[pk + i] + a[src + i];
                }
            }
            for (int k = 0; k < nz; k++) {
                int lo = Math.max(0, k - r) * nx;
                int hi = (Math.min(nz - 1, k + r) + 1) * nx;
                int dst = nx * j + slice * k;
                for (int i = 0; i < nx; i++) {
                    a[dst + i] = (float) (p[hi + i] - p[lo + i]);
                }
            }
        });
    }
}
