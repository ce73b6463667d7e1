package org.turnmark.registration.metric;

import org.turnmark.geom.Parallel;

/** Shared argument checks and masked reductions for the metrics. */
final class MetricChecks {

    /** Flat block size of element-wise reductions (fixed partition, independent of thread count). */
    static final int BLOCK = 1 << 16;

    private MetricChecks() {
    }

    static void lengths(int n, float[] fixed, float[] warped, byte[] mask) {
        if (fixed.length != n || warped.length != n || mask.length != n) {
            throw new IllegalArgumentException("fixed, warped and mask must each have " + n + " values, got "
                    + fixed.length + ", " + warped.length + ", " + mask.length);
        }
    }

    /** Number of mask voxels; throws if none. */
    static long count(byte[] mask) {
        int nb = Parallel.blockCount(mask.length, BLOCK);
        long[] c = new long[nb];
        Parallel.forEachBlock(nb, mask.length, b -> {
            long s = 0;
            for (int n = b * BLOCK, end = Math.min(mask.length, n + BLOCK); n < end; n++) {
                if (mask[n] != 0) {
                    s++;
                }
            }
            c[b] = s;
        });
        long total = 0;
        for (long s : c) {
            total += s;
        }
        if (total == 0) {
            throw new IllegalArgumentException("similarity mask selects no voxel: the images do not overlap "
                    + "inside the masks (expected ≥ 1 voxel)");
        }
        return total;
    }
}
