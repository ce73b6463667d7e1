package org.turnmark.app.gui;

import java.util.Arrays;

import org.turnmark.registration.volume.Volume;

/**
 * Window/level display mapping: values from {@code center − width/2} to {@code center + width/2} map
 * linearly onto black…white, values beyond clamp (common practice in image viewers). Immutable.
 *
 * @param center the level, in image units
 * @param width  the window, in image units, &gt; 0
 */
public record DisplayWindow(double center, double width) {

    /** Smallest window accepted, so that a constant image still maps without dividing by zero. */
    public static final double MIN_WIDTH = 1e-6;

    /** At most this many voxels are sampled (evenly strided) to pick the automatic window. */
    static final int AUTO_SAMPLES = 200_000;

    public DisplayWindow {
        if (!Double.isFinite(center) || !Double.isFinite(width) || width < MIN_WIDTH) {
            throw new IllegalArgumentException("window must have a finite level and a width >= " + MIN_WIDTH
                    + ", got level " + center + ", width " + width);
        }
    }

    /** Grey level 0…255 of value {@code v}; non-finite values are black. */
    public int gray(double v) {
        if (!(v == v) || Double.isInfinite(v)) {
            return 0;
        }
        double t = (v - (center - 0.5 * width)) / width;
        if (t <= 0) {
            return 0;
        }
        if (t >= 1) {
            return 255;
        }
        return (int) (t * 255.0 + 0.5);
    }

    /**
     * A window from the 1st to the 99th percentile of the finite voxel values (sampled on an even stride
     * for large images), so that a few hot voxels do not wash out the display.
     */
    public static DisplayWindow auto(Volume volume) {
        float[] d = volume.data();
        int stride = Math.max(1, d.length / AUTO_SAMPLES);
        float[] s = new float[(d.length + stride - 1) / stride];
        int n = 0;
        for (int q = 0; q < d.length; q += stride) {
            float v = d[q];
            if (Float.isFinite(v)) {
                s[n++] = v;
            }
        }
        if (n == 0) {
            return new DisplayWindow(0.5, 1);
        }
        Arrays.sort(s, 0, n);
        double lo = s[(int) Math.floor(0.01 * (n - 1))];
        double hi = s[(int) Math.ceil(0.99 * (n - 1))];
        if (hi - lo < MIN_WIDTH) {
            lo = s[0];
            hi = s[n - 1];
        }
        // A constant image still gets a usable window of one unit around its value.
        double w = hi - lo >= MIN_WIDTH ? hi - lo : 1.0;
        return new DisplayWindow(0.5 * (lo + hi), w);
    }
}
