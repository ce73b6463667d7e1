package org.turnmark.registration.resample;

import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;

/**
 * Separable Gaussian smoothing with widths in millimetres.
 *
 * <p>Along voxel axis a the standard deviation in voxels is {@code sigmaMm[a] / spacingMm(a)}; the
 * sampled kernel {@code exp(-m²/(2σ²))}, normalised to sum 1, is truncated at radius
 * {@code (int) (TRUNCATE_SIGMAS·σ + 0.5)} voxels. The boundary is half-sample symmetric reflection
 * ({@code d c b a | a b c d | d c b a}), which keeps the mean of a constant image. This is the same
 * kernel, radius and boundary as {@code scipy.ndimage.gaussian_filter(mode='reflect', truncate=4.0)}.
 * Axes with σ = 0 are left as they are. Lines are accumulated in {@code double}.
 *
 * <p>Multi-threaded (fixed slice/row blocks), bit-identical for any thread count. Thread safe.
 */
public final class GaussianSmoothing {

    /** Kernel radius in standard deviations. */
    public static final double TRUNCATE_SIGMAS = 4.0;

    /**
     * Largest accepted σ in voxels; wider kernels are rejected rather than allocating buffers of
     * millions of padding values (a smoothing that wide has flattened any image on a real grid).
     */
    public static final double MAX_SIGMA_VOXELS = 10_000;

    private GaussianSmoothing() {
    }

    /**
     * Smooths a scalar image.
     *
     * @param in      voxels on {@code grid} (x fastest); not modified unless it is {@code out}
     * @param out     receives the smoothed image, length {@code grid.size()}; may be the same array as
     *                {@code in} (in-place smoothing)
     * @param grid    sampling grid (spacing taken from its voxel→world columns)
     * @param sigmaMm one value (isotropic) or three (along voxel axes i, j, k), each finite and ≥ 0 mm
     * @throws IllegalArgumentException for wrong lengths or invalid sigma
     */
    public static void smooth(float[] in, float[] out, Grid3 grid, double... sigmaMm) {
        int n = grid.size();
        if (in.length != n || out.length != n) {
            throw new IllegalArgumentException("input and output must have grid size " + n + ", got "
                    + in.length + " and " + out.length);
        }
        double[] sv = sigmaVoxels(grid, sigmaMm);
        int nx = grid.nx();
        int ny = grid.ny();
        int nz = grid.nz();
        float[] src = in;
        // Each pass reads every line into a buffer before writing it, so passes may run in place.
        if (sv[0] > 0) {
            GaussianKernels.passX(src, out, nx, ny, nz, GaussianKernels.halfKernel(sv[0], TRUNCATE_SIGMAS));
            src = out;
        }
        if (sv[1] > 0) {
            GaussianKernels.passY(src, out, nx, ny, nz, GaussianKernels.halfKernel(sv[1], TRUNCATE_SIGMAS));
            src = out;
        }
        if (sv[2] > 0) {
            GaussianKernels.passZ(src, out, nx, ny, nz, GaussianKernels.halfKernel(sv[2], TRUNCATE_SIGMAS));
            src = out;
        }
        if (src != out) {
            System.arraycopy(in, 0, out, 0, n);
        }
    }

    /**
     * Smooths each component of a vector field with the same widths.
     *
     * @param in      field to smooth; not modified unless it is {@code out}
     * @param out     receives the result; may be {@code in} (in place); must be on the same grid
     * @param sigmaMm one value (isotropic) or three (voxel axes i, j, k), mm
     */
    public static void smooth(VectorField in, VectorField out, double... sigmaMm) {
        if (!in.grid().sameGrid(out.grid(), 0.0)) {
            throw new IllegalArgumentException("input and output fields must share a grid, got "
                    + in.grid() + " and " + out.grid());
        }
        for (int c = 0; c < 3; c++) {
            smooth(in.component(c), out.component(c), in.grid(), sigmaMm);
        }
    }

    /** Per-axis σ in voxels, {@code sigmaMm / spacingMm}, validated. */
    static double[] sigmaVoxels(Grid3 grid, double... sigmaMm) {
        if (sigmaMm == null || (sigmaMm.length != 1 && sigmaMm.length != 3)) {
            throw new IllegalArgumentException("sigmaMm needs 1 or 3 values, got "
                    + (sigmaMm == null ? "null" : sigmaMm.length));
        }
        double[] s = new double[3];
        for (int a = 0; a < 3; a++) {
            double v = sigmaMm.length == 1 ? sigmaMm[0] : sigmaMm[a];
            if (!(v >= 0) || Double.isInfinite(v)) {
                throw new IllegalArgumentException("sigma must be finite and >= 0 mm, got " + v + " (axis " + a + ")");
            }
            s[a] = v / grid.spacingMm(a);
            if (s[a] > MAX_SIGMA_VOXELS) {
                throw new IllegalArgumentException("sigma " + v + " mm is " + s[a] + " voxels along axis " + a
                        + ", more than the limit of " + MAX_SIGMA_VOXELS + " voxels");
            }
        }
        return s;
    }
}
