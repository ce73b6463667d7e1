package org.turnmark.registration.volume;

import java.util.Arrays;

import org.turnmark.geom.Parallel;

/**
 * Intensity statistics of a scalar image, optionally inside a mask: voxel count, min, max, mean,
 * standard deviation (population, two-pass) and exact percentiles.
 *
 * <p>Percentiles use linear interpolation between order statistics: for sorted values
 * {@code x[0..n-1]} and level p (%), position {@code h = (n-1)·p/100}, value
 * {@code x[floor h] + (h - floor h)·(x[floor h + 1] - x[floor h])} (Hyndman and Fan 1996, definition
 * 7; the default of {@code numpy.percentile}). Order statistics are found without sorting the image:
 * repeated histogram passes narrow the value range to one bin, bounded by the actual smallest and
 * largest value in it, until the bin holds at most {@link #SORT_LIMIT} values or a single distinct
 * value; then those values are sorted. Memory beyond the image: {@code O(blocks × bins)}.
 *
 * <p>Blocks of {@link #BLOCK} voxels are fixed by the image size; block sums are added in block order,
 * so results are bit-identical for any thread count. Immutable and thread safe.
 */
public final class VolumeStatistics {

    /** Voxels per parallel block. */
    static final int BLOCK = 1 << 16;

    /** Bins per histogram pass. */
    static final int BINS = 4096;

    /** Largest entry-wise voxel→world difference (mm) for a mask to count as on the image grid. */
    public static final double MASK_GRID_TOLERANCE_MM = 1e-4;

    /** A bin with at most this many values is sorted directly. */
    public static final int SORT_LIMIT = 1 << 14;

    private final long count;
    private final double min;
    private final double max;
    private final double mean;
    private final double standardDeviation;
    private final double[] levels;
    private final double[] values;

    private VolumeStatistics(long count, double min, double max, double mean, double sd,
                             double[] levels, double[] values) {
        this.count = count;
        this.min = min;
        this.max = max;
        this.mean = mean;
        this.standardDeviation = sd;
        this.levels = levels;
        this.values = values;
    }

    /** Statistics of the whole volume with the 1st, 50th and 99th percentiles. */
    public static VolumeStatistics of(Volume v) {
        return of(v.data(), null, 1, 50, 99);
    }

    /**
     * Statistics of {@code v} where {@code mask} is non-zero (all voxels if mask is null), with the
     * requested percentile levels (%).
     *
     * @throws IllegalArgumentException if the mask is on another grid, or as for
     *                                  {@link #of(float[], float[], double...)}
     */
    public static VolumeStatistics of(Volume v, Volume mask, double... percentiles) {
        if (mask != null && !mask.grid().sameGrid(v.grid(), MASK_GRID_TOLERANCE_MM)) {
            throw new IllegalArgumentException("mask grid " + mask.grid() + " differs from image grid " + v.grid());
        }
        return of(v.data(), mask == null ? null : mask.data(), percentiles);
    }

    /**
     * Statistics of {@code data} where {@code mask} is non-zero (all voxels if mask is null), with the
     * requested percentile levels.
     *
     * @param data        voxel values; not modified; all selected values must be finite
     * @param mask        same length as data, voxel selected where {@code mask[q] != 0}; or null
     * @param percentiles levels in [0, 100] (%)
     * @throws IllegalArgumentException for mismatched lengths, an empty selection, a level outside
     *                                  [0, 100], or a non-finite selected voxel (its index is named)
     */
    public static VolumeStatistics of(float[] data, float[] mask, double... percentiles) {
        if (mask != null && mask.length != data.length) {
            throw new IllegalArgumentException("mask must have " + data.length + " voxels like the image, got "
                    + mask.length);
        }
        for (double p : percentiles) {
            if (!(p >= 0 && p <= 100)) {
                throw new IllegalArgumentException("percentile level must be in [0, 100] %, got " + p);
            }
        }
        final int n = data.length;
        final int nb = Parallel.blockCount(n, BLOCK);
        final long[] cnt = new long[nb];
        final double[] sum = new double[nb];
        final float[] lo = new float[nb];
        final float[] hi = new float[nb];
        final int[] bad = new int[nb];
        Parallel.forEachBlock(nb, n, b -> {
            int from = b * BLOCK;
            int to = Math.min(n, from + BLOCK);
            long c = 0;
            double s = 0;
            float mn = Float.POSITIVE_INFINITY;
            float mx = Float.NEGATIVE_INFINITY;
            int badAt = -1;
            for (int q = from; q < to; q++) {
                if (mask == null || mask[q] != 0) {
                    float v = data[q];
                    if (!Float.isFinite(v)) {
                        badAt = q;
                        break;
                    }
                    c++;
                    s += v;
                    mn = Math.min(mn, v);
                    mx = Math.max(mx, v);
                }
            }
            cnt[b] = c;
            sum[b] = s;
            lo[b] = mn;
            hi[b] = mx;
            bad[b] = badAt;
        });
        long count = 0;
        double total = 0;
        float mn = Float.POSITIVE_INFINITY;
        float mx = Float.NEGATIVE_INFINITY;
        for (int b = 0; b < nb; b++) {
            if (bad[b] >= 0) {
                throw new IllegalArgumentException("voxel " + bad[b] + " is not finite (" + data[bad[b]]
                        + "); statistics need finite values");
            }
            count += cnt[b];
            total += sum[b];
            mn = Math.min(mn, lo[b]);
            mx = Math.max(mx, hi[b]);
        }
        if (count == 0) {
            throw new IllegalArgumentException("mask selects no voxels (of " + n + ")");
        }
        final double mean = total / count;
        final double[] ss = new double[nb];
        Parallel.forEachBlock(nb, n, b -> {
            int from = b * BLOCK;
            int to = Math.min(n, from + BLOCK);
            double s = 0;
            for (int q = from; q < to; q++) {
                if (mask == null || mask[q] != 0) {
                    double d = data[q] - mean;
                    s += d * d;
                }
            }
            ss[b] = s;
        });
        double var = 0;
        for (int b = 0; b < nb; b++) {
            var += ss[b];
        }
        double[] levels = percentiles.clone();
        // Ranks needed by all levels, answered together so histogram passes are shared.
        long[] ranks = new long[2 * levels.length];
        for (int t = 0; t < levels.length; t++) {
            double h = (count - 1) * levels[t] / 100.0;
            long r = (long) Math.floor(h);
            ranks[2 * t] = r;
            ranks[2 * t + 1] = Math.min(count - 1, r + 1);
        }
        long[] sorted = Arrays.stream(ranks).distinct().sorted().toArray();
        double[] stat = new double[sorted.length];
        select(data, mask, sorted, 0, sorted.length, mn, mx, 0, stat);
        double[] vals = new double[levels.length];
        for (int t = 0; t < levels.length; t++) {
            double h = (count - 1) * levels[t] / 100.0;
            double frac = h - Math.floor(h);
            double a = stat[Arrays.binarySearch(sorted, ranks[2 * t])];
            double b = stat[Arrays.binarySearch(sorted, ranks[2 * t + 1])];
            vals[t] = frac > 0 ? a + frac * (b - a) : a;
        }
        return new VolumeStatistics(count, mn, mx, mean, Math.sqrt(var / count), levels, vals);
    }

    /**
     * Finds the order statistics of ranks {@code ranks[from..to)} (sorted, 0-based) among the selected
     * values; all selected values of those ranks lie in [lo, hi] and {@code below} selected values are
     * smaller than lo. Results go to {@code out[from..to)}.
     */
    static void select(float[] data, float[] mask, long[] ranks, int from, int to, float lo, float hi, long below,
                       double[] out) {
        if (lo == hi) {
            for (int t = from; t < to; t++) {
                out[t] = lo;
            }
            return;
        }
        final int n = data.length;
        final int nb = Parallel.blockCount(n, BLOCK);
        final float l = lo;
        final float u = hi;
        final double scale = BINS / ((double) u - l);
        final int[][] hist = new int[nb][];
        final float[][] bmin = new float[nb][];
        final float[][] bmax = new float[nb][];
        Parallel.forEachBlock(nb, n, b -> {
            int[] h = new int[BINS];
            float[] bl = new float[BINS];
            float[] bu = new float[BINS];
            Arrays.fill(bl, Float.POSITIVE_INFINITY);
            Arrays.fill(bu, Float.NEGATIVE_INFINITY);
            int start = b * BLOCK;
            int end = Math.min(n, start + BLOCK);
            for (int q = start; q < end; q++) {
                float v = data[q];
                if (v >= l && v <= u && (mask == null || mask[q] != 0)) {
                    // Monotone in v, so every bin holds a contiguous value range.
                    int bin = Math.min(BINS - 1, (int) ((v - (double) l) * scale));
                    h[bin]++;
                    if (v < bl[bin]) {
                        bl[bin] = v;
                    }
                    if (v > bu[bin]) {
                        bu[bin] = v;
                    }
                }
            }
            hist[b] = h;
            bmin[b] = bl;
            bmax[b] = bu;
        });
        long cum = below;
        int t = from;
        for (int bin = 0; bin < BINS && t < to; bin++) {
            long c = 0;
            for (int b = 0; b < nb; b++) {
                c += hist[b][bin];
            }
            int first = t;
            while (t < to && ranks[t] < cum + c) {
                t++;
            }
            if (t > first) {
                float newLo = Float.POSITIVE_INFINITY;
                float newHi = Float.NEGATIVE_INFINITY;
                for (int b = 0; b < nb; b++) {
                    newLo = Math.min(newLo, bmin[b][bin]);
                    newHi = Math.max(newHi, bmax[b][bin]);
                }
                if (c <= SORT_LIMIT || newLo == newHi) {
                    float[] vals = new float[newLo == newHi ? 0 : (int) c];
                    if (newLo != newHi) {
                        int w = 0;
                        for (int q = 0; q < n; q++) {
                            float v = data[q];
                            if (v >= newLo && v <= newHi && (mask == null || mask[q] != 0)) {
                                vals[w++] = v;
                            }
                        }
                        Arrays.sort(vals);
                    }
                    for (int r = first; r < t; r++) {
                        out[r] = newLo == newHi ? newLo : vals[(int) (ranks[r] - cum)];
                    }
                } else {
                    select(data, mask, ranks, first, t, newLo, newHi, cum, out);
                }
            }
            cum += c;
        }
        if (t < to) {
            throw new IllegalStateException("rank " + ranks[t] + " beyond the " + cum + " selected values");
        }
    }

    /** Number of selected voxels. */
    public long count() {
        return count;
    }

    /** Smallest selected value. */
    public double min() {
        return min;
    }

    /** Largest selected value. */
    public double max() {
        return max;
    }

    /** Mean of the selected values. */
    public double mean() {
        return mean;
    }

    /** Population standard deviation of the selected values. */
    public double standardDeviation() {
        return standardDeviation;
    }

    /** The requested percentile levels (%), as a new array. */
    public double[] percentileLevels() {
        return levels.clone();
    }

    /** Percentile values in the order of {@link #percentileLevels()}, as a new array. */
    public double[] percentileValues() {
        return values.clone();
    }

    /**
     * Value of percentile level {@code p} (%), which must be one of the requested levels.
     *
     * @throws IllegalArgumentException if p was not requested
     */
    public double percentile(double p) {
        for (int t = 0; t < levels.length; t++) {
            if (levels[t] == p) {
                return values[t];
            }
        }
        throw new IllegalArgumentException("percentile " + p + " % was not computed; computed levels "
                + Arrays.toString(levels));
    }
}
