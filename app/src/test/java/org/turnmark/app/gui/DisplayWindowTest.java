package org.turnmark.app.gui;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.junit.jupiter.api.Test;

import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.Volume;

class DisplayWindowTest {

    @Test
    void windowEndsMapToBlackAndWhiteAndClamp() {
        DisplayWindow w = new DisplayWindow(100, 50);
        assertEquals(0, w.gray(75));
        assertEquals(255, w.gray(125));
        assertEquals(128, w.gray(100));
        assertEquals(0, w.gray(-1e9));
        assertEquals(255, w.gray(1e9));
        assertEquals(0, w.gray(Double.NaN));
    }

    @Test
    void autoWindowSpansTheFirstToNinetyNinthPercentileOfARamp() {
        // Values 0..999 once each: the order statistics at 1 % and 99 % of n − 1 = 999 are
        // floor(9.99) = 9 and ceil(989.01) = 990 (nearest-rank rule of DisplayWindow.auto).
        float[] d = new float[1000];
        for (int q = 0; q < d.length; q++) {
            d[q] = (q * 37) % 1000; // a permutation of 0..999
        }
        Volume v = new Volume(Grid3.axisAligned(10, 10, 10, 1, 1, 1, 0, 0, 0), d);
        DisplayWindow w = DisplayWindow.auto(v);
        assertEquals(0.5 * (9 + 990), w.center(), 0.0);
        assertEquals(990 - 9, w.width(), 0.0);
    }

    @Test
    void constantOrNonFiniteImagesStillGetAUsableWindow() {
        float[] d = new float[8];
        java.util.Arrays.fill(d, 7f);
        DisplayWindow w = DisplayWindow.auto(new Volume(Grid3.axisAligned(2, 2, 2, 1, 1, 1, 0, 0, 0), d));
        assertEquals(7, w.center(), 0.0);
        java.util.Arrays.fill(d, Float.NaN);
        DisplayWindow n = DisplayWindow.auto(new Volume(Grid3.axisAligned(2, 2, 2, 1, 1, 1, 0, 0, 0), d));
        assertEquals(1, n.width(), 0.0);
    }

    @Test
    void zeroWidthIsRejectedWithTheValues() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> new DisplayWindow(1, 0));
        assertEquals(true, e.getMessage().contains("width 0"));
    }
}
