package org.turnmark.registration.metric;

/**
 * An intensity interval used to bin (mutual information) or normalise (local correlation) an image.
 * Fixed per registration level so that the cost of different iterations is comparable.
 *
 * @param min lowest intensity, finite
 * @param max highest intensity, finite and &gt; min
 */
public record IntensityRange(double min, double max) {

    public IntensityRange {
        if (!Double.isFinite(min) || !Double.isFinite(max) || !(max > min)) {
            throw new IllegalArgumentException("intensity range must be finite with max > min, got [" + min + ", "
                    + max + "] (a constant image has no usable contrast)");
        }
    }

    /**
     * Range of {@code data} over voxels with {@code mask[n] != 0} (all voxels if mask is null).
     *
     * @param what names the image in the error message
     * @throws IllegalArgumentException if no voxel is selected or the image is constant there
     */
    public static IntensityRange of(float[] data, byte[] mask, String what) {
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (int n = 0; n < data.length; n++) {
            if (mask == null || mask[n] != 0) {
                lo = Math.min(lo, data[n]);
                hi = Math.max(hi, data[n]);
            }
        }
        if (lo > hi) {
            throw new IllegalArgumentException(what + ": mask selects no voxel (expected ≥ 1)");
        }
        if (!(hi > lo)) {
            throw new IllegalArgumentException(what + " is constant (" + lo + ") inside its mask; "
                    + "registration needs contrast (expected max > min)");
        }
        return new IntensityRange(lo, hi);
    }

    /** max − min. */
    public double width() {
        return max - min;
    }
}
