package org.turnmark.registration.resample;

/**
 * Point sampling of raw voxel arrays at continuous voxel coordinates: nearest, trilinear and cubic
 * B-spline, each with an explicit {@link Outside} policy.
 *
 * <p>Conventions: {@code data[i + nx*(j + ny*k)]} (x fastest, NIfTI order); a coordinate
 * {@code (i, j, k)} is a continuous voxel index with voxel centres at integers. Points in the closed
 * box {@code [0, nx-1] × [0, ny-1] × [0, nz-1]} (widened by {@link #EDGE_TOLERANCE_VOXELS}) are
 * interpolated; others follow the policy
 * ({@link Outside#CONSTANT} returns {@code fill}, {@link Outside#CLAMP} samples the nearest edge
 * point, {@link Outside#FAIL} throws {@link OutsideGridException}). A NaN coordinate always throws;
 * no method returns NaN for finite data and a finite fill. Axes of size 1 are constant along that
 * axis.
 *
 * <p>Sampling methods allocate nothing, modify nothing and do not check array lengths per call (the
 * caller guarantees {@code data.length >= nx*ny*nz}); they are safe to call from many threads at
 * once on the same arrays.
 */
public final class Interpolation {

    /**
     * Points this close (in voxels) outside the box of voxel centres are clamped onto it and
     * interpolated rather than treated as outside: voxel→world→voxel round trips of edge voxels land
     * a few 1e-16 voxel outside, which must not turn an edge sample into the fill value.
     */
    public static final double EDGE_TOLERANCE_VOXELS = 1e-6;

    private Interpolation() {
    }

    /** Value of the nearest voxel, {@code data[floor(i+0.5), floor(j+0.5), floor(k+0.5)]}. */
    public static double nearest(float[] data, int nx, int ny, int nz, double i, double j, double k,
                                 Outside policy, double fill) {
        return SamplingKernels.nearest(data, nx, ny, nz, i, j, k, policy, fill);
    }

    /**
     * Trilinear interpolation of the 8 voxels around {@code (i, j, k)}. Matches
     * {@code scipy.ndimage.map_coordinates(order=1)} inside the grid.
     */
    public static double linear(float[] data, int nx, int ny, int nz, double i, double j, double k,
                                Outside policy, double fill) {
        return SamplingKernels.linear(data, nx, ny, nz, i, j, k, policy, fill);
    }

    /**
     * Cubic B-spline interpolation. {@code coefficients} must come from
     * {@link #bsplineCoefficients} (or {@link #bsplinePrefilterInPlace}) of the same grid, not the
     * raw samples. Matches {@code scipy.ndimage.map_coordinates(order=3, mode='mirror')} inside the
     * grid. Under {@link Outside#CLAMP} the clamped point is interpolated, which on the edge equals
     * the edge sample.
     */
    public static double cubic(float[] coefficients, int nx, int ny, int nz, double i, double j, double k,
                               Outside policy, double fill) {
        return SamplingKernels.cubic(coefficients, nx, ny, nz, i, j, k, policy, fill);
    }

    /**
     * Samples with the given kind: {@code data} holds samples for {@link Interp#NEAREST} and
     * {@link Interp#LINEAR}, B-spline coefficients for {@link Interp#CUBIC_BSPLINE}.
     */
    public static double sample(Interp kind, float[] data, int nx, int ny, int nz, double i, double j, double k,
                                Outside policy, double fill) {
        switch (kind) {
            case NEAREST:
                return SamplingKernels.nearest(data, nx, ny, nz, i, j, k, policy, fill);
            case LINEAR:
                return SamplingKernels.linear(data, nx, ny, nz, i, j, k, policy, fill);
            default:
                return SamplingKernels.cubic(data, nx, ny, nz, i, j, k, policy, fill);
        }
    }

    /**
     * Cubic B-spline coefficients of {@code samples} (mirror boundary), as a new array;
     * {@code samples} is not modified. Multi-threaded, bit-identical for any thread count.
     *
     * @throws IllegalArgumentException if a size is &lt; 1 or {@code samples.length != nx*ny*nz}
     */
    public static float[] bsplineCoefficients(float[] samples, int nx, int ny, int nz) {
        checkSize(samples, nx, ny, nz);
        float[] c = samples.clone();
        BSplinePrefilter.inPlace(c, nx, ny, nz);
        return c;
    }

    /**
     * Replaces {@code samples} by its cubic B-spline coefficients (mirror boundary).
     *
     * @throws IllegalArgumentException if a size is &lt; 1 or {@code samples.length != nx*ny*nz}
     */
    public static void bsplinePrefilterInPlace(float[] samples, int nx, int ny, int nz) {
        checkSize(samples, nx, ny, nz);
        BSplinePrefilter.inPlace(samples, nx, ny, nz);
    }

    /**
     * Returns the array an interpolator of {@code kind} samples from: the samples themselves for
     * nearest and linear, new B-spline coefficients for cubic.
     */
    public static float[] prepare(Interp kind, float[] samples, int nx, int ny, int nz) {
        checkSize(samples, nx, ny, nz);
        return kind == Interp.CUBIC_BSPLINE ? bsplineCoefficients(samples, nx, ny, nz) : samples;
    }

    static void checkSize(float[] a, int nx, int ny, int nz) {
        if (nx < 1 || ny < 1 || nz < 1) {
            throw new IllegalArgumentException("grid dimensions must be >= 1, got " + nx + "x" + ny + "x" + nz);
        }
        long n = (long) nx * ny * nz;
        if (a.length != n) {
            throw new IllegalArgumentException("voxel array must have nx*ny*nz = " + n + " values, got " + a.length);
        }
    }
}
