package org.turnmark.registration.resample;

import org.turnmark.geom.Parallel;

/**
 * Cubic B-spline prefilter: turns samples into interpolation coefficients so that the spline
 * {@code sum_m c[m] beta3(x - m)} passes through every sample. Separable; along each line it runs
 * the recursive filter of Unser, Aldroubi and Eden (IEEE Trans Signal Process 41(2), 1993; Unser,
 * IEEE Signal Process Mag 16(6), 1999, Box 2): gain 6, one causal and one anti-causal first-order
 * pass with pole {@code z = sqrt(3) - 2}, whole-sample mirror boundary ({@code d c b | a b c d | c b
 * a}), with the exact mirror initialisation of both passes (no truncated horizon). Lines are filtered
 * in {@code double}; coefficients are stored as {@code float}.
 *
 * <p>Blocks are z-slices (x and y passes) and y-rows (z pass), fixed by the grid alone, so the result
 * is bit-identical for any thread count.
 */
final class BSplinePrefilter {

    /** Pole of the cubic B-spline prefilter, sqrt(3) - 2. */
    static final double POLE = Math.sqrt(3) - 2;

    /** Overall gain (1 - z)(1 - 1/z) = 6 for the cubic B-spline. */
    static final double GAIN = 6.0;

    private BSplinePrefilter() {
    }

    /**
     * Filters one line in place: {@code c[0..n)}. Lines of length 1 are left unchanged.
     */
    static void filterLine(double[] c, int n) {
        if (n < 2) {
            return;
        }
        final double z = POLE;
        for (int i = 0; i < n; i++) {
            c[i] *= GAIN;
        }
        // Causal initialisation for a mirror-extended line (exact sum over one period).
        double zn1 = Math.pow(z, n - 1);
        double zi = z;
        double c0 = c[0] + zn1 * c[n - 1];
        for (int i = 1; i < n - 1; i++) {
            c0 += zi * (c[i] + zn1 * c[n - 1 - i]);
            zi *= z;
        }
        c[0] = c0 / (1 - zn1 * zn1);
        for (int i = 1; i < n; i++) {
            c[i] += z * c[i - 1];
        }
        // Anti-causal initialisation for the mirror boundary.
        c[n - 1] = (z * c[n - 2] + c[n - 1]) * z / (z * z - 1);
        for (int i = n - 2; i >= 0; i--) {
            c[i] = z * (c[i + 1] - c[i]);
        }
    }

    /**
     * Filters {@code w} interleaved lines at once: {@code b[r*w + i]} is sample r of line i, for r in
     * [0, n). Same arithmetic as {@link #filterLine} per line, with the inner loop over i so that the
     * y and z passes walk memory contiguously (the strided one-line-at-a-time walk was several times
     * slower on a 256×256×160 volume).
     *
     * @param acc scratch of length ≥ w
     */
    static void filterLines(double[] b, int n, int w, double[] acc) {
        if (n < 2) {
            return;
        }
        final double z = POLE;
        final int total = n * w;
        for (int q = 0; q < total; q++) {
            b[q] *= GAIN;
        }
        final double zn1 = Math.pow(z, n - 1);
        final int last = (n - 1) * w;
        for (int i = 0; i < w; i++) {
            acc[i] = b[i] + zn1 * b[last + i];
        }
        double zi = z;
        for (int r = 1; r < n - 1; r++) {
            int fr = r * w;
            int bk = (n - 1 - r) * w;
            for (int i = 0; i < w; i++) {
                acc[i] += zi * (b[fr + i] + zn1 * b[bk + i]);
            }
            zi *= z;
        }
        final double norm = 1 - zn1 * zn1;
        for (int i = 0; i < w; i++) {
            b[i] = acc[i] / norm;
        }
        for (int r = 1; r < n; r++) {
            int cur = r * w;
            int prev = cur - w;
            for (int i = 0; i < w; i++) {
                b[cur + i] += z * b[prev + i];
            }
        }
        final double anti = z / (z * z - 1);
        final int before = (n - 2) * w;
        for (int i = 0; i < w; i++) {
            b[last + i] = (z * b[before + i] + b[last + i]) * anti;
        }
        for (int r = n - 2; r >= 0; r--) {
            int cur = r * w;
            int next = cur + w;
            for (int i = 0; i < w; i++) {
                b[cur + i] = z * (b[next + i] - b[cur + i]);
            }
        }
    }

    /**
     * Prefilters {@code c} in place along x, then y, then z.
     *
     * @param c  samples on an nx×ny×nz grid (x fastest); replaced by the coefficients
     */
    static void inPlace(float[] c, int nx, int ny, int nz) {
        final long work = (long) nx * ny * nz;
        final int plane = nx * ny;
        // x and y passes: one block per z-slice.
        Parallel.forEachBlock(nz, work, k -> {
            double[] buf = Scratch.get(0, plane);
            double[] acc = Scratch.get(1, Math.max(nx, ny));
            int base = k * plane;
            for (int q = 0; q < plane; q++) {
                buf[q] = c[base + q];
            }
            if (nx > 1) {
                for (int j = 0; j < ny; j++) {
                    System.arraycopy(buf, j * nx, acc, 0, nx);
                    filterLine(acc, nx);
                    System.arraycopy(acc, 0, buf, j * nx, nx);
                }
            }
            filterLines(buf, ny, nx, acc);
            for (int q = 0; q < plane; q++) {
                c[base + q] = (float) buf[q];
            }
        });
        if (nz > 1) {
            // z pass: one block per y-row; the nz rows of nx values of that row, filtered together.
            Parallel.forEachBlock(ny, work, j -> {
                double[] buf = Scratch.get(0, nz * nx);
                double[] acc = Scratch.get(1, nx);
                int b = j * nx;
                for (int k = 0; k < nz; k++) {
                    int src = b + k * plane;
                    int dst = k * nx;
                    for (int i = 0; i < nx; i++) {
                        buf[dst + i] = c[src + i];
                    }
                }
                filterLines(buf, nz, nx, acc);
                for (int k = 0; k < nz; k++) {
                    int dst = b + k * plane;
                    int src = k * nx;
                    for (int i = 0; i < nx; i++) {
                        c[dst + i] = (float) buf[src + i];
                    }
                }
            });
        }
    }
}
