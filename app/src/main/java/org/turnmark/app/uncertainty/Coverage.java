package org.turnmark.app.uncertainty;

import org.apache.commons.math3.distribution.BetaDistribution;

/**
 * Statistics for checking that the uncertainty ellipsoids are calibrated: the squared Mahalanobis
 * distance of a true position from a prediction, and the exact (Clopper–Pearson) confidence interval
 * of a coverage fraction counted over many cases.
 *
 * <p>If the prediction error e is Gaussian N(0, Σ), then d² = eᵀ Σ⁻¹ e follows χ²₃, so the truth lies
 * inside the p-ellipsoid (d² ≤ χ²₃(p), {@link Ellipsoid#chiSquare3}) in a fraction p of the cases and
 * the mean of d² is 3. Stateless and thread safe.
 */
public final class Coverage {

    /**
     * Pivot of the Cholesky factor, relative to the largest diagonal entry, below which a covariance is
     * refused as not positive definite: about the square root of double precision, where a 3×3 factor
     * has lost every significant digit of the smallest variance.
     */
    public static final double MIN_RELATIVE_PIVOT = 1e-8;

    private Coverage() {
    }

    /**
     * An interval [lower, upper] of a proportion.
     *
     * @param lower lower bound in [0, 1]
     * @param upper upper bound in [0, 1]
     */
    public record Interval(double lower, double upper) {
    }

    /**
     * Squared Mahalanobis distance d² = eᵀ Σ⁻¹ e, by the Cholesky factor Σ = L Lᵀ (d² = |L⁻¹ e|²).
     *
     * @param errorMm       e, length 3 (mm; not modified)
     * @param covarianceMm2 Σ, 3×3 row-major (9 values, mm²; not modified), symmetric positive definite
     * @return d² (dimensionless)
     * @throws IllegalArgumentException for wrong lengths, non-finite values or a Σ that is not positive
     *                                  definite (a pivot below {@link #MIN_RELATIVE_PIVOT} of the scale)
     */
    public static double mahalanobisSquared(double[] errorMm, double[] covarianceMm2) {
        if (errorMm.length != 3 || covarianceMm2.length != 9) {
            throw new IllegalArgumentException("need a 3-vector and a 3x3 covariance, got lengths " + errorMm.length
                    + " and " + covarianceMm2.length);
        }
        for (double v : errorMm) {
            if (!Double.isFinite(v)) {
                throw new IllegalArgumentException("error vector must be finite, got " + v);
            }
        }
        for (double v : covarianceMm2) {
            if (!Double.isFinite(v)) {
                throw new IllegalArgumentException("covariance must be finite, got " + v);
            }
        }
        double[] s = covarianceMm2;
        double scale = Math.max(s[0], Math.max(s[4], s[8]));
        if (!(scale > 0)) {
            throw new IllegalArgumentException("covariance must be positive definite, largest variance " + scale);
        }
        double tiny = MIN_RELATIVE_PIVOT * scale;
        // Lower-triangular L with Σ = L Lᵀ (the lower triangle of Σ is read; symmetry is assumed).
        double p0 = s[0];
        check(p0, tiny, 0);
        double l00 = Math.sqrt(p0);
        double l10 = s[3] / l00;
        double l20 = s[6] / l00;
        double p1 = s[4] - l10 * l10;
        check(p1, tiny, 1);
        double l11 = Math.sqrt(p1);
        double l21 = (s[7] - l20 * l10) / l11;
        double p2 = s[8] - l20 * l20 - l21 * l21;
        check(p2, tiny, 2);
        double l22 = Math.sqrt(p2);
        // Forward substitution z = L⁻¹ e; d² = zᵀ z.
        double z0 = errorMm[0] / l00;
        double z1 = (errorMm[1] - l10 * z0) / l11;
        double z2 = (errorMm[2] - l20 * z0 - l21 * z1) / l22;
        return z0 * z0 + z1 * z1 + z2 * z2;
    }

    private static void check(double pivot, double tiny, int i) {
        if (!(pivot > tiny)) {
            throw new IllegalArgumentException("covariance must be positive definite: Cholesky pivot " + i + " is "
                    + pivot + " mm², below " + tiny + " mm²");
        }
    }

    /**
     * The exact two-sided confidence interval of a binomial proportion (Clopper &amp; Pearson 1934,
     * Biometrika 26:404–413), in its beta-quantile form (Brown, Cai &amp; DasGupta 2001, Statistical
     * Science 16:101–133, §4.2.1; from memory):
     * lower = B(α/2; x, n − x + 1), upper = B(1 − α/2; x + 1, n − x), with α = 1 − confidence and
     * B(q; a, b) the q-quantile of the beta distribution (Commons Math {@link BetaDistribution});
     * lower = 0 when x = 0 and upper = 1 when x = n. It guarantees at least the stated coverage.
     *
     * @param successes  x, in [0, n]
     * @param trials     n ≥ 1
     * @param confidence in (0, 1), e.g. 0.95
     */
    public static Interval clopperPearson(int successes, int trials, double confidence) {
        if (trials < 1) {
            throw new IllegalArgumentException("trials must be >= 1, got " + trials);
        }
        if (successes < 0 || successes > trials) {
            throw new IllegalArgumentException("successes must be in [0, " + trials + "], got " + successes);
        }
        if (!(confidence > 0 && confidence < 1)) {
            throw new IllegalArgumentException("confidence must be in (0, 1), got " + confidence);
        }
        double alpha = 1 - confidence;
        double lower = successes == 0 ? 0
                : new BetaDistribution(null, successes, trials - successes + 1.0).inverseCumulativeProbability(alpha / 2);
        double upper = successes == trials ? 1
                : new BetaDistribution(null, successes + 1.0, trials - successes).inverseCumulativeProbability(1 - alpha / 2);
        return new Interval(lower, upper);
    }
}
