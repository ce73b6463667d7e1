package org.turnmark.app.uncertainty;

/**
 * Covariance of predicted 3-D positions, row-major 3×3 arrays in mm². Stateless.
 */
public final class Covariance3 {

    private Covariance3() {
    }

    /**
     * Spread of sampled positions about a reference point (the nominal prediction):
     * {@code S/(N−1) + (x̄ − x₀)(x̄ − x₀)ᵀ}, the unbiased sample covariance plus the squared offset of
     * the sample mean from the reference, so a nominal prediction away from the sample mean gets a
     * correspondingly larger ellipsoid.
     *
     * @param samples   N positions, {@code samples[n]} of length 3 (not modified); N ≥ 2
     * @param reference x₀, length 3
     * @return 9 values, row-major
     */
    public static double[] aboutReference(double[][] samples, double[] reference) {
        int n = samples.length;
        if (n < 2) {
            throw new IllegalArgumentException("need at least 2 samples for a covariance, got " + n);
        }
        double[] mean = new double[3];
        for (double[] s : samples) {
            for (int c = 0; c < 3; c++) {
                if (!Double.isFinite(s[c])) {
                    throw new IllegalArgumentException("sample position must be finite, got " + s[c]);
                }
                mean[c] += s[c] / n;
            }
        }
        double[] cov = new double[9];
        for (double[] s : samples) {
            for (int r = 0; r < 3; r++) {
                for (int c = 0; c < 3; c++) {
                    cov[3 * r + c] += (s[r] - mean[r]) * (s[c] - mean[c]) / (n - 1);
                }
            }
        }
        for (int r = 0; r < 3; r++) {
            for (int c = 0; c < 3; c++) {
                cov[3 * r + c] += (mean[r] - reference[r]) * (mean[c] - reference[c]);
            }
        }
        return cov;
    }

    /** {@code a + b}, a new array. */
    public static double[] add(double[] a, double[] b) {
        double[] out = new double[9];
        for (int n = 0; n < 9; n++) {
            out[n] = a[n] + b[n];
        }
        return out;
    }

    /** σ² I. */
    public static double[] isotropic(double sigmaMm) {
        double v = sigmaMm * sigmaMm;
        return new double[] {v, 0, 0, 0, v, 0, 0, 0, v};
    }

    /** {@code J Σ Jᵀ} for a 3×3 Jacobian J (row-major), propagating an input covariance through a map. */
    public static double[] propagate(double[] jacobian, double[] sigma) {
        double[] js = new double[9];
        for (int r = 0; r < 3; r++) {
            for (int c = 0; c < 3; c++) {
                double s = 0;
                for (int k = 0; k < 3; k++) {
                    s += jacobian[3 * r + k] * sigma[3 * k + c];
                }
                js[3 * r + c] = s;
            }
        }
        double[] out = new double[9];
        for (int r = 0; r < 3; r++) {
            for (int c = 0; c < 3; c++) {
                double s = 0;
                for (int k = 0; k < 3; k++) {
                    s += js[3 * r + k] * jacobian[3 * c + k];
                }
                out[3 * r + c] = s;
            }
        }
        // Symmetrise against round-off so the ellipsoid's symmetry check never trips on it.
        for (int r = 0; r < 3; r++) {
            for (int c = r + 1; c < 3; c++) {
                double m = 0.5 * (out[3 * r + c] + out[3 * c + r]);
                out[3 * r + c] = m;
                out[3 * c + r] = m;
            }
        }
        return out;
    }
}
