/**
 * Sampling, resampling and smoothing of scalar volumes and vector fields.
 *
 * <p>Public facade: {@link org.turnmark.registration.resample.Interpolation} (nearest, trilinear and
 * cubic B-spline point sampling of raw {@code float[]} voxel arrays with an explicit
 * {@link org.turnmark.registration.resample.Outside} policy),
 * {@link org.turnmark.registration.resample.Resampler} (a volume or vector field onto another grid
 * through an affine and/or a displacement field), {@link org.turnmark.registration.resample.GaussianSmoothing}
 * (separable, widths in mm) and {@link org.turnmark.registration.resample.Grids} (isotropic, rescaled
 * and rotated grids). Kernels live in package-private classes behind them.
 *
 * <p>Conventions: voxels x fastest, {@code data[i + nx*(j + ny*k)]}; continuous voxel coordinates
 * with voxel centres at integers; world = RAS+ mm. Multi-threaded work is split into blocks fixed by
 * the grid size, so results are bit-identical for any thread count. Checked against SciPy 1.10
 * {@code scipy.ndimage} on committed fixtures ({@code src/test/resources/resample/make_fixtures.py}).
 */
package org.turnmark.registration.resample;
