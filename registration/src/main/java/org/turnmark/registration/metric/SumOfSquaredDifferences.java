package org.turnmark.registration.metric;

import org.turnmark.geom.Parallel;

/**
 * Mean squared difference {@code cost = (1/N) Σ_mask (F − W)²}, N the number of mask voxels;
 * {@code ∂cost/∂W(x) = −2 (F(x) − W(x)) / N}. Units: intensity². Sums in double per fixed block,
 * reduced in block order.
 */
public final class SumOfSquaredDifferences implements SimilarityMetric {

    @Override
    public MetricKind kind() {
        return MetricKind.SSD;
    }

    @Override
    public double cost(float[] fixed, float[] warped, byte[] mask) {
        return run(fixed, warped, mask, null);
    }

    @Override
    public double costAndDerivative(float[] fixed, float[] warped, byte[] mask, float[] derivative) {
        if (derivative.length != fixed.length || derivative == fixed || derivative == warped) {
            throw new IllegalArgumentException("derivative must be a separate array of " + fixed.length + " values");
        }
        return run(fixed, warped, mask, derivative);
    }

    private static double run(float[] f, float[] w, byte[] mask, float[] d) {
        MetricChecks.lengths(f.length, f, w, mask);
        long count = MetricChecks.count(mask);
        int n = f.length;
        int nb = Parallel.blockCount(n, MetricChecks.BLOCK);
        double[] partial = new double[nb];
        double scale = -2.0 / count;
        Parallel.forEachBlock(nb, n, b -> {
            double s = 0;
            for (int i = b * MetricChecks.BLOCK, end = Math.min(n, i + MetricChecks.BLOCK); i < end; i++) {
                if (mask[i] != 0) {
                    double r = (double) f[i] - w[i];
                    s += r * r;
                    if (d != null) {
                        d[i] = (float) (scale * r);
                    }
                } else if (d != null) {
                    d[i] = 0f;
                }
            }
            partial[b] = s;
        });
        double s = 0;
        for (double p : partial) {
            s += p;
        }
        return s / count;
    }
}
