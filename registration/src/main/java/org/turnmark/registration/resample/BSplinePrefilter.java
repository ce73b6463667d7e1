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
     * Prefilters {@code c} in place along x, then y, then z.
     *
     * @param c  samples on an nx×ny×nz grid (x fastest); replaced by the coefficients
     */
    static void inPlace(float[] c, int nx, int ny, int nz) {
        final long work = (long) nx * ny * nz;
        final int plane = nx * ny;
        // x and y passes: one block per z-slice.
        Parallel.forEachBlock(nz, work, k -> {
            double[] line = new double[Math.max(nx, ny)];
            int base = k * plane;
            if (nx > 1) {
                for (int j = 0; j < ny; j++) {
                    int r = base + j * nx;
                    for (int i = 0; i < nx; i++) {
                        line[i] = c[r + i];
                    }
                    filterLine(line, nx);
                    for (int i = 0; i < nx; i++) {
                        c[r + i] = (float) line[i];
                    }
                }
            }
            if (ny > 1) {
                for (int i = 0; i < nx; i++) {
                    for (int j = 0; j < ny; j++) {
                        line[j] = c[base + i + j * nx];
                    }
                    filterLine(line, ny);
                    for (int j = 0; j < ny; j++) {
                        c[base + i + j * nx] = (float) line[j];
                    }
                }
            }
        });
        if (nz > 1) {
            // z pass: one block per y-row; columns along z for all i of the row at once.
            Parallel.forEachBlock(ny, work, j -> {
                double[] line = new double[nz];
                for (int i = 0; i < nx; i++) {
                    int b = i + j * nx;
                    for (int k = 0; k < nz; k++) {
                        line[k] = c[b + k * plane];
                    }
                    filterLine(line, nz);
                    for (int k = 0; k < nz; k++) {
                        c[b + k * plane] = (float) line[k];
                    }
                }
            });
        }
    }
}
