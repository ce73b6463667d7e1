package org.turnmark.registration.metric;

import org.turnmark.geom.Parallel;

/**
 * Mutual information with Parzen windowing after Mattes et al. (IEEE TMI 22, 2003): a zero-order
 * (box) window on the fixed intensity and a cubic B-spline window β₃ on the warped moving intensity,
 * so that the joint histogram is differentiable in W:
 * <pre>
 *   ξ_F = (F − F_min)/Δ_F + 2,  ξ_W = (W − W_min)/Δ_W + 2,  Δ = (max − min)/(bins − 5)
 *   p(ι, κ) = (1/N) Σ_x [ι = round ξ_F(x)] β₃(κ − ξ_W(x))
 *   MI = Σ p log(p / (p_F p_W))  (nats),   cost = −MI
 *   ∂cost/∂W(x) = (1/(N Δ_W)) Σ_κ β₃'(κ − ξ_W(x)) log(p(ι_x, κ) / p_W(κ))
 * </pre>
 * (the p_F terms and the constant drop out because β₃ is a partition of unity). The two-bin padding
 * keeps every window inside the histogram. Intensities outside the ranges given at construction are
 * clamped to them (derivative 0 there). Histograms are accumulated per fixed block in double and
 * reduced in block order: bit-identical for any thread count.
 *
 * <p>Keeps its histogram workspace; not thread safe.
 */
public final class MattesMutualInformation implements SimilarityMetric {

    /** Fewest bins accepted (2 padding bins each side plus at least four intensity bins). */
    public static final int MIN_BINS = 8;

    private final int bins;
    private final double fMin;
    private final double fInv;
    private final double wMin;
    private final double wInv;
    private final double[] joint;
    private final double[] logRatio;

    /**
     * @param bins         histogram bins per axis, ≥ {@link #MIN_BINS} (32 is common practice)
     * @param fixedRange   intensity range of the fixed image
     * @param movingRange  intensity range of the moving image (as sampled: interpolation stays inside it)
     */
    public MattesMutualInformation(int bins, IntensityRange fixedRange, IntensityRange movingRange) {
        if (bins < MIN_BINS || bins > 1024) {
            throw new IllegalArgumentException("MI bins must be in [" + MIN_BINS + ", 1024], got " + bins);
        }
        this.bins = bins;
        this.fMin = fixedRange.min();
        this.fInv = (bins - 5) / fixedRange.width();
        this.wMin = movingRange.min();
        this.wInv = (bins - 5) / movingRange.width();
        this.joint = new double[bins * bins];
        this.logRatio = new double[bins * bins];
    }

    @Override
    public MetricKind kind() {
        return MetricKind.MI;
    }

    /** Number of bins per axis. */
    public int bins() {
        return bins;
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

    /** Cubic B-spline β₃(t). */
    static double bspline3(double t) {
        double a = Math.abs(t);
        if (a < 1) {
            return 2.0 / 3.0 - a * a + 0.5 * a * a * a;
        }
        if (a < 2) {
            double b = 2 - a;
            return b * b * b / 6.0;
        }
        return 0;
    }

    /** Derivative β₃'(t). */
    static double bspline3Derivative(double t) {
        double a = Math.abs(t);
        if (a < 1) {
            return -2 * t + 1.5 * t * a;
        }
        if (a < 2) {
            double b = 2 - a;
            return t > 0 ? -0.5 * b * b : 0.5 * b * b;
        }
        return 0;
    }

    private double xiF(float v) {
        double x = (v - fMin) * fInv + 2;
        return x < 2 ? 2 : (x > bins - 3 ? bins - 3 : x);
    }

    private double run(float[] f, float[] w, byte[] mask, float[] d) {
        final int n = f.length;
        MetricChecks.lengths(n, f, w, mask);
        final long count = MetricChecks.count(mask);
        final int nb = Parallel.blockCount(n, MetricChecks.BLOCK);
        final int bb = bins * bins;
        final double[][] partial = new double[nb][];
        final double hi = bins - 3;
        Parallel.forEachBlock(nb, (long) n * 4, b -> {
            double[] h = new double[bb];
            for (int i = b * MetricChecks.BLOCK, end = Math.min(n, i + MetricChecks.BLOCK); i < end; i++) {
                if (mask[i] == 0) {
                    continue;
                }
                int iota = (int) Math.floor(xiF(f[i]) + 0.5);
                double xw = (w[i] - wMin) * wInv + 2;
                xw = xw < 2 ? 2 : (xw > hi ? hi : xw);
                int k0 = (int) Math.floor(xw) - 1;
                int row = iota * bins;
                for (int kappa = k0; kappa < k0 + 4; kappa++) {
                    h[row + kappa] += bspline3(kappa - xw);
                }
            }
            partial[b] = h;
        });
        java.util.Arrays.fill(joint, 0);
        for (double[] h : partial) {
            for (int q = 0; q < bb; q++) {
                joint[q] += h[q];
            }
        }
        double inv = 1.0 / count;
        double[] pf = new double[bins];
        double[] pw = new double[bins];
        for (int a = 0; a < bins; a++) {
            for (int c = 0; c < bins; c++) {
                double p = joint[a * bins + c] * inv;
                joint[a * bins + c] = p;
                pf[a] += p;
                pw[c] += p;
            }
        }
        double mi = 0;
        for (int a = 0; a < bins; a++) {
            for (int c = 0; c < bins; c++) {
                double p = joint[a * bins + c];
                if (p > 0) {
                    mi += p * Math.log(p / (pf[a] * pw[c]));
                    logRatio[a * bins + c] = Math.log(p / pw[c]);
                } else {
                    logRatio[a * bins + c] = 0;
                }
            }
        }
        if (d == null) {
            return -mi;
        }
        final double scale = wInv * inv;
        Parallel.forEachBlock(nb, (long) n * 4, b -> {
            for (int i = b * MetricChecks.BLOCK, end = Math.min(n, i + MetricChecks.BLOCK); i < end; i++) {
                if (mask[i] == 0) {
                    d[i] = 0f;
                    continue;
                }
                double xw = (w[i] - wMin) * wInv + 2;
                if (xw < 2 || xw > hi) {
                    d[i] = 0f;
                    continue;
                }
                int iota = (int) Math.floor(xiF(f[i]) + 0.5);
                int k0 = (int) Math.floor(xw) - 1;
                int row = iota * bins;
                double g = 0;
                for (int kappa = k0; kappa < k0 + 4; kappa++) {
                    g += bspline3Derivative(kappa - xw) * logRatio[row + kappa];
                }
                d[i] = (float) (scale * g);
            }
        });
        return -mi;
    }
}
