package org.turnmark.registration.volume;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.InputStream;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.util.Arrays;
import java.util.Random;

import org.junit.jupiter.api.Test;

class VolumeStatisticsTest {

    /**
     * Percentiles interpolate between two float order statistics in double: only the last-bit
     * rounding of one multiply-add differs from numpy's lerp on values O(3), ~1e-15; 1e-12 is safe.
     */
    private static final double PERCENTILE_TOLERANCE = 1e-12;

    /**
     * Means/SDs of ≤ 10^6 float values summed in double per block: relative error ≤ n·2^-53 ≈ 1e-10
     * vs a naive sequential double sum.
     */
    private static final double SUM_TOLERANCE = 1e-9;

    /** Naive percentile: sort the selected values, linear interpolation (numpy.percentile default). */
    static double naivePercentile(float[] data, float[] mask, double p) {
        float[] sel = new float[data.length];
        int n = 0;
        for (int q = 0; q < data.length; q++) {
            if (mask == null || mask[q] != 0) {
                sel[n++] = data[q];
            }
        }
        float[] s = Arrays.copyOf(sel, n);
        Arrays.sort(s);
        double h = (n - 1) * p / 100.0;
        int r = (int) Math.floor(h);
        double f = h - r;
        return f > 0 ? s[r] + f * (s[r + 1] - (double) s[r]) : s[r];
    }

    @Test
    void percentilesMatchNumpyOnTheCommittedFixtureWithAndWithoutMask() throws IOException {
        float[] vol = new float[9 * 7 * 5];
        readLittleEndian("/resample/volume.f32").asFloatBuffer().get(vol);
        double[] expected = new double[6];
        // numpy 1.24 numpy.percentile (default linear method), see resample/make_fixtures.py
        readLittleEndian("/resample/percentiles.f64").asDoubleBuffer().get(expected);
        VolumeStatistics all = VolumeStatistics.of(vol, null, 1, 50, 99);
        float[] mask = new float[vol.length];
        for (int q = 0; q < vol.length; q++) {
            mask[q] = vol[q] > 0.2f ? 1 : 0;
        }
        VolumeStatistics masked = VolumeStatistics.of(vol, mask, 1, 50, 99);
        double[] got = {all.percentile(1), all.percentile(50), all.percentile(99),
            masked.percentile(1), masked.percentile(50), masked.percentile(99)};
        for (int t = 0; t < 6; t++) {
            assertEquals(expected[t], got[t], PERCENTILE_TOLERANCE, "percentile " + t);
        }
        assertTrue(masked.count() > 10 && masked.count() < vol.length, "mask must select a proper subset");
    }

    private static ByteBuffer readLittleEndian(String name) throws IOException {
        try (InputStream in = VolumeStatisticsTest.class.getResourceAsStream(name)) {
            if (in == null) {
                throw new IOException("missing test fixture " + name);
            }
            return ByteBuffer.wrap(in.readAllBytes()).order(ByteOrder.LITTLE_ENDIAN);
        }
    }

    @Test
    void histogramSelectionMatchesSortingOnLargeTiedAndSpreadData() {
        // 300k voxels: 70 % exact zeros (a background bin far above the sort limit), a narrow
        // cluster that needs several narrowing passes, and a few huge outliers.
        int n = 300_001;
        float[] d = new float[n];
        Random r = new Random(17);
        for (int q = 0; q < n; q++) {
            double u = r.nextDouble();
            if (u < 0.7) {
                d[q] = 0;
            } else if (u < 0.999) {
                d[q] = (float) (100 + 1e-3 * r.nextGaussian());
            } else {
                d[q] = (float) (r.nextDouble() * 1e9 - 5e8);
            }
        }
        double[] levels = {0, 1, 50, 69.9, 70, 85, 99, 99.95, 100};
        VolumeStatistics s = VolumeStatistics.of(d, null, levels);
        for (double p : levels) {
            assertEquals(naivePercentile(d, null, p), s.percentile(p), PERCENTILE_TOLERANCE * Math.abs(s.percentile(p)) + 0.0,
                    "level " + p);
        }
        float[] mask = new float[n];
        for (int q = 0; q < n; q += 3) {
            mask[q] = 2;
        }
        VolumeStatistics m = VolumeStatistics.of(d, mask, levels);
        for (double p : levels) {
            assertEquals(naivePercentile(d, mask, p), m.percentile(p), PERCENTILE_TOLERANCE * Math.abs(m.percentile(p)),
                    "masked level " + p);
        }
        assertEquals(100_001, m.count());
    }

    @Test
    void momentsMatchNaiveSums() {
        int n = 200_003;
        float[] d = new float[n];
        Random r = new Random(5);
        double sum = 0;
        for (int q = 0; q < n; q++) {
            d[q] = (float) (50 + 10 * r.nextGaussian());
            sum += d[q];
        }
        double mean = sum / n;
        double ss = 0;
        float mn = Float.POSITIVE_INFINITY;
        float mx = Float.NEGATIVE_INFINITY;
        for (float v : d) {
            ss += (v - mean) * (v - mean);
            mn = Math.min(mn, v);
            mx = Math.max(mx, v);
        }
        VolumeStatistics s = VolumeStatistics.of(d, null);
        assertEquals(mean, s.mean(), SUM_TOLERANCE * Math.abs(mean));
        assertEquals(Math.sqrt(ss / n), s.standardDeviation(), SUM_TOLERANCE * 10);
        assertEquals(mn, s.min(), 0.0);
        assertEquals(mx, s.max(), 0.0);
        assertEquals(n, s.count());
    }

    @Test
    void badInputIsRejectedWithContext() {
        float[] d = {1, 2, Float.NaN, 4};
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> VolumeStatistics.of(d, null, 50));
        assertTrue(e.getMessage().contains("voxel 2"), e.getMessage());
        // A NaN outside the mask is ignored.
        assertEquals(3.0, VolumeStatistics.of(d, new float[] {0, 1, 0, 1}, 50).percentile(50), 0.0);
        assertThrows(IllegalArgumentException.class, () -> VolumeStatistics.of(d, new float[4], 50));
        assertThrows(IllegalArgumentException.class, () -> VolumeStatistics.of(new float[] {1}, null, 101));
        org.turnmark.geom.Grid3 g = org.turnmark.geom.Grid3.axisAligned(2, 2, 1, 1, 1, 1, 0, 0, 0);
        org.turnmark.geom.Grid3 shifted = org.turnmark.geom.Grid3.axisAligned(2, 2, 1, 1, 1, 1, 1, 0, 0);
        Volume img = new Volume(g, new float[] {1, 2, 3, 4});
        assertEquals(4.0, VolumeStatistics.of(img, new Volume(g, new float[] {0, 0, 0, 1}), 50).percentile(50), 0.0);
        assertThrows(IllegalArgumentException.class,
                () -> VolumeStatistics.of(img, new Volume(shifted, new float[4]), 50));
        assertThrows(IllegalArgumentException.class, () -> VolumeStatistics.of(new float[] {1}, null, 50).percentile(1));
    }
}
