package org.turnmark.registration.resample;

/**
 * Allocation-free point-sampling kernels behind {@link Interpolation}. Arrays are x fastest,
 * {@code data[i + nx*(j + ny*k)]}; coordinates are continuous voxel indices (voxel centres at
 * integers). Each kernel first applies the {@link Outside} policy, then interpolates a point that
 * lies in the closed box {@code [0, n-1]³}.
 */
final class SamplingKernels {

    private SamplingKernels() {
    }

    /** True if (x, y, z) lies in the closed box of voxel centres. NaN gives false. */
    static boolean inside(double x, double y, double z, int nx, int ny, int nz) {
        return x >= 0 && y >= 0 && z >= 0 && x <= nx - 1 && y <= ny - 1 && z <= nz - 1;
    }

    /**
     * True if (x, y, z) lies within {@link Interpolation#EDGE_TOLERANCE_VOXELS} of the box of voxel
     * centres; such points are clamped onto the box instead of being treated as outside.
     */
    static boolean nearlyInside(double x, double y, double z, int nx, int ny, int nz) {
        final double e = Interpolation.EDGE_TOLERANCE_VOXELS;
        return x >= -e && y >= -e && z >= -e && x <= nx - 1 + e && y <= ny - 1 + e && z <= nz - 1 + e;
    }

    static double clamp(double v, int n) {
        return v < 0 ? 0 : (v > n - 1 ? n - 1 : v);
    }

    static void checkNotNaN(double x, double y, double z, int nx, int ny, int nz) {
        if (Double.isNaN(x) || Double.isNaN(y) || Double.isNaN(z)) {
            throw new OutsideGridException(x, y, z, nx, ny, nz);
        }
    }

    static double nearest(float[] d, int nx, int ny, int nz, double x, double y, double z,
                          Outside policy, double fill) {
        if (!inside(x, y, z, nx, ny, nz)) {
            checkNotNaN(x, y, z, nx, ny, nz);
            if (!nearlyInside(x, y, z, nx, ny, nz)) {
                if (policy == Outside.CONSTANT) {
                    return fill;
                }
                if (policy == Outside.FAIL) {
                    throw new OutsideGridException(x, y, z, nx, ny, nz);
                }
            }
            x = clamp(x, nx);
            y = clamp(y, ny);
            z = clamp(z, nz);
        }
        // x >= 0, so the cast truncates towards floor; x + 0.5 <= n - 0.5 stays in range.
        int i = (int) (x + 0.5);
        int j = (int) (y + 0.5);
        int k = (int) (z + 0.5);
        return d[i + nx * (j + ny * k)];
    }

    /**
     * Trilinear interpolation: {@code sum over the 8 corners of prod_a (1 - |x_a - c_a|) * d[c]}.
     */
    static double linear(float[] d, int nx, int ny, int nz, double x, double y, double z,
                         Outside policy, double fill) {
        if (!inside(x, y, z, nx, ny, nz)) {
            checkNotNaN(x, y, z, nx, ny, nz);
            if (!nearlyInside(x, y, z, nx, ny, nz)) {
                if (policy == Outside.CONSTANT) {
                    return fill;
                }
                if (policy == Outside.FAIL) {
                    throw new OutsideGridException(x, y, z, nx, ny, nz);
                }
            }
            x = clamp(x, nx);
            y = clamp(y, ny);
            z = clamp(z, nz);
        }
        return linearInside(d, nx, ny, nz, x, y, z);
    }

    /** Trilinear interpolation of a point known to lie in {@code [0, n-1]³}. */
    static double linearInside(float[] d, int nx, int ny, int nz, double x, double y, double z) {
        // Lower corner: floor, except on the last centre where the cell to the left is used
        // (fraction 1), so the upper corner is never past the end. Axes of size 1 use offset 0.
        int i0 = (int) x;
        int j0 = (int) y;
        int k0 = (int) z;
        int di = 1;
        int dj = nx;
        int dk = nx * ny;
        if (i0 >= nx - 1) {
            if (nx == 1) {
                di = 0;
            } else {
                i0 = nx - 2;
            }
        }
        if (j0 >= ny - 1) {
            if (ny == 1) {
                dj = 0;
            } else {
                j0 = ny - 2;
            }
        }
        if (k0 >= nz - 1) {
            if (nz == 1) {
                dk = 0;
            } else {
                k0 = nz - 2;
            }
        }
        double fx = x - i0;
        double fy = y - j0;
        double fz = z - k0;
        double gx = 1 - fx;
        double gy = 1 - fy;
        double gz = 1 - fz;
        int b = i0 + nx * (j0 + ny * k0);
        double c00 = gx * d[b] + fx * d[b + di];
        double c10 = gx * d[b + dj] + fx * d[b + dj + di];
        double c01 = gx * d[b + dk] + fx * d[b + dk + di];
        double c11 = gx * d[b + dk + dj] + fx * d[b + dk + dj + di];
        double c0 = gy * c00 + fy * c10;
        double c1 = gy * c01 + fy * c11;
        return gz * c0 + fz * c1;
    }

    /** Whole-sample mirror of index {@code m} into [0, n): -1 → 1, n → n-2 (period 2(n-1)). */
    static int mirror(int m, int n) {
        if (m >= 0 && m < n) {
            return m;
        }
        if (n == 1) {
            return 0;
        }
        int p = 2 * (n - 1);
        int r = m % p;
        if (r < 0) {
            r += p;
        }
        return r < n ? r : p - r;
    }

    /**
     * Cubic B-spline interpolation of coefficients {@code c} (from {@link BSplinePrefilter}):
     * {@code f(x) = sum_m c[m] beta3(x - m)} over the 4×4×4 support, coefficient indices mirrored
     * at the edges (whole-sample symmetric).
     */
    static double cubic(float[] c, int nx, int ny, int nz, double x, double y, double z,
                        Outside policy, double fill) {
        if (!inside(x, y, z, nx, ny, nz)) {
            checkNotNaN(x, y, z, nx, ny, nz);
            if (!nearlyInside(x, y, z, nx, ny, nz)) {
                if (policy == Outside.CONSTANT) {
                    return fill;
                }
                if (policy == Outside.FAIL) {
                    throw new OutsideGridException(x, y, z, nx, ny, nz);
                }
            }
            x = clamp(x, nx);
            y = clamp(y, ny);
            z = clamp(z, nz);
        }
        int i = (int) x;
        int j = (int) y;
        int k = (int) z;
        double tx = x - i;
        double ty = y - j;
        double tz = z - k;
        // Cubic B-spline weights for offsets -1..2 (Unser 1999, IEEE Signal Process Mag, eq. 3).
        double wx0 = w0(tx);
        double wx1 = w1(tx);
        double wx2 = w2(tx);
        double wx3 = w3(tx);
        double wy0 = w0(ty);
        double wy1 = w1(ty);
        double wy2 = w2(ty);
        double wy3 = w3(ty);
        double wz0 = w0(tz);
        double wz1 = w1(tz);
        double wz2 = w2(tz);
        double wz3 = w3(tz);
        final int plane = nx * ny;
        if (i >= 1 && j >= 1 && k >= 1 && i + 2 < nx && j + 2 < ny && k + 2 < nz) {
            // Interior: the 4×4×4 support needs no mirroring; walk it from its first corner.
            int b = (i - 1) + nx * ((j - 1) + ny * (k - 1));
            return wz0 * planeAt(c, b, nx, wx0, wx1, wx2, wx3, wy0, wy1, wy2, wy3)
                    + wz1 * planeAt(c, b + plane, nx, wx0, wx1, wx2, wx3, wy0, wy1, wy2, wy3)
                    + wz2 * planeAt(c, b + 2 * plane, nx, wx0, wx1, wx2, wx3, wy0, wy1, wy2, wy3)
                    + wz3 * planeAt(c, b + 3 * plane, nx, wx0, wx1, wx2, wx3, wy0, wy1, wy2, wy3);
        }
        int ix0 = mirror(i - 1, nx);
        int ix1 = mirror(i, nx);
        int ix2 = mirror(i + 1, nx);
        int ix3 = mirror(i + 2, nx);
        int jy0 = nx * mirror(j - 1, ny);
        int jy1 = nx * mirror(j, ny);
        int jy2 = nx * mirror(j + 1, ny);
        int jy3 = nx * mirror(j + 2, ny);
        int kz0 = plane * mirror(k - 1, nz);
        int kz1 = plane * mirror(k, nz);
        int kz2 = plane * mirror(k + 1, nz);
        int kz3 = plane * mirror(k + 2, nz);
        double s0 = plane(c, kz0, jy0, jy1, jy2, jy3, ix0, ix1, ix2, ix3, wx0, wx1, wx2, wx3, wy0, wy1, wy2, wy3);
        double s1 = plane(c, kz1, jy0, jy1, jy2, jy3, ix0, ix1, ix2, ix3, wx0, wx1, wx2, wx3, wy0, wy1, wy2, wy3);
        double s2 = plane(c, kz2, jy0, jy1, jy2, jy3, ix0, ix1, ix2, ix3, wx0, wx1, wx2, wx3, wy0, wy1, wy2, wy3);
        double s3 = plane(c, kz3, jy0, jy1, jy2, jy3, ix0, ix1, ix2, ix3, wx0, wx1, wx2, wx3, wy0, wy1, wy2, wy3);
        return wz0 * s0 + wz1 * s1 + wz2 * s2 + wz3 * s3;
    }

    private static double planeAt(float[] c, int b, int nx, double wx0, double wx1, double wx2, double wx3,
                                  double wy0, double wy1, double wy2, double wy3) {
        return wy0 * (wx0 * c[b] + wx1 * c[b + 1] + wx2 * c[b + 2] + wx3 * c[b + 3])
                + wy1 * (wx0 * c[b + nx] + wx1 * c[b + nx + 1] + wx2 * c[b + nx + 2] + wx3 * c[b + nx + 3])
                + wy2 * (wx0 * c[b + 2 * nx] + wx1 * c[b + 2 * nx + 1] + wx2 * c[b + 2 * nx + 2]
                        + wx3 * c[b + 2 * nx + 3])
                + wy3 * (wx0 * c[b + 3 * nx] + wx1 * c[b + 3 * nx + 1] + wx2 * c[b + 3 * nx + 2]
                        + wx3 * c[b + 3 * nx + 3]);
    }

    private static double plane(float[] c, int kb, int jy0, int jy1, int jy2, int jy3,
                                int ix0, int ix1, int ix2, int ix3,
                                double wx0, double wx1, double wx2, double wx3,
                                double wy0, double wy1, double wy2, double wy3) {
        return wy0 * row(c, kb + jy0, ix0, ix1, ix2, ix3, wx0, wx1, wx2, wx3)
                + wy1 * row(c, kb + jy1, ix0, ix1, ix2, ix3, wx0, wx1, wx2, wx3)
                + wy2 * row(c, kb + jy2, ix0, ix1, ix2, ix3, wx0, wx1, wx2, wx3)
                + wy3 * row(c, kb + jy3, ix0, ix1, ix2, ix3, wx0, wx1, wx2, wx3);
    }

    private static double row(float[] c, int rb, int ix0, int ix1, int ix2, int ix3,
                              double wx0, double wx1, double wx2, double wx3) {
        return wx0 * c[rb + ix0] + wx1 * c[rb + ix1] + wx2 * c[rb + ix2] + wx3 * c[rb + ix3];
    }

    /** beta3(t + 1) = (1 - t)³ / 6: weight of offset -1 for fraction t in [0, 1]. */
    static double w0(double t) {
        double u = 1 - t;
        return u * u * u / 6;
    }

    /** beta3(t) = (4 - 6t² + 3t³) / 6: weight of offset 0. */
    static double w1(double t) {
        return (4 + t * t * (3 * t - 6)) / 6;
    }

    /** beta3(1 - t) = (1 + 3t + 3t² - 3t³) / 6: weight of offset +1. */
    static double w2(double t) {
        return (1 + t * (3 + t * (3 - 3 * t))) / 6;
    }

    /** beta3(2 - t) = t³ / 6: weight of offset +2. */
    static double w3(double t) {
        return t * t * t / 6;
    }
}
