package org.turnmark.registration.resample;

/**
 * What sampling returns at a point outside the grid. A point is outside when any continuous voxel
 * coordinate lies outside the closed range {@code [0, n-1]} of voxel centres on its axis by more
 * than {@link Interpolation#EDGE_TOLERANCE_VOXELS} (no extrapolation beyond the outermost voxel
 * centres). No policy ever returns NaN; a NaN coordinate is
 * always rejected with {@link OutsideGridException}.
 */
public enum Outside {
    /** Return the caller's fill value (usually 0). */
    CONSTANT,
    /** Clamp each coordinate to {@code [0, n-1]}: the value at the nearest edge point. */
    CLAMP,
    /** Throw {@link OutsideGridException} carrying the offending coordinate. */
    FAIL
}
