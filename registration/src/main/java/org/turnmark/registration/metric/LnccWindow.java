package org.turnmark.registration.metric;

/** Weighting of the local window of {@link LocalCorrelation}. */
public enum LnccWindow {
    /** Uniform weights in a box of half-width r (rounded to whole voxels per axis), via running sums. */
    BOX,
    /** Gaussian weights with standard deviation r/2 (so ±2σ spans the box), via separable smoothing. */
    GAUSSIAN
}
