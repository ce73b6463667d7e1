package org.turnmark.mechanics.solve;

import org.turnmark.geom.Parallel;

/** Deterministic vector kernels (per-block partial sums added in block order). Stateless. */
final class VecOps {

    static final int BLOCK = 8192;

    private VecOps() {
    }

    static double dot(double[] a, double[] b) {
        int n = a.length;
        int nb = Parallel.blockCount(n, BLOCK);
        if (nb <= 1) {
            double s = 0;
            for (int i = 0; i < n; i++) {
                s += a[i] * b[i];
            }
            return s;
        }
        double[] part = new double[nb];
        Parallel.forEachBlock(nb, n, blk -> {
            int from = blk * BLOCK;
            int to = Math.min(n, from + BLOCK);
            double s = 0;
            for (int i = from; i < to; i++) {
                s += a[i] * b[i];
            }
            part[blk] = s;
        });
        double s = 0;
        for (double p : part) {
            s += p;
        }
        return s;
    }

    static double norm(double[] a) {
        return Math.sqrt(dot(a, a));
    }

    static double maxAbs(double[] a) {
        double m = 0;
        for (double v : a) {
            m = Math.max(m, Math.abs(v));
        }
        return m;
    }
}
