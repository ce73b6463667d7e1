package org.turnmark.registration.resample;

/** Interpolation kind used when sampling a volume at non-integer voxel coordinates. */
public enum Interp {
    /** Value of the nearest voxel centre (ties round up: {@code floor(x + 0.5)}). */
    NEAREST,
    /** Trilinear interpolation of the 8 surrounding voxels. */
    LINEAR,
    /**
     * Cubic B-spline (order 3) interpolation of prefiltered coefficients, mirror boundary; see
     * {@link Interpolation#bsplineCoefficients}.
     */
    CUBIC_BSPLINE
}
