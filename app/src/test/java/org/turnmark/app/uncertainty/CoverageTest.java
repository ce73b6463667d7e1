package org.turnmark.app.uncertainty;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;

class CoverageTest {

    /** d² of a well-conditioned 3×3 (condition < 10): a few ulps of round-off, with ample margin. */
    private static final double MAHALANOBIS_TOL = 1e-12;
    /**
     * Commons Math's beta inverse CDF stops at an absolute accuracy of 1e-9
     * (BetaDistribution.DEFAULT_INVERSE_ABSOLUTE_ACCURACY); ten times that as margin.
     */
    private static final double QUANTILE_TOL = 1e-8;
    /** Monte Carlo draws for the coverage check. */
    private static final int DRAWS = 40_000;
    /** Four binomial standard deviations of a 95 % fraction over {@link #DRAWS} (one SD: √(0.95·0.05/40000) ≈ 0.0011). */
    private static final double COVERAGE_TOL = 4 * Math.sqrt(0.95 * 0.05 / DRAWS);

    @Test
    void mahalanobisOfAHandComputedCase() {
        // Σ = [[4, 2, 0], [2, 5, 0], [0, 0, 9]], e = (1, 2, 3). The 2×2 block has determinant 16 and
        // inverse [[5, −2], [−2, 4]] / 16, so eᵀΣ⁻¹e = (5·1 − 2·2·1·2 + 4·2²) / 16 + 3² / 9 = 13/16 + 1
        // (closed form, by hand).
        double[] cov = {4, 2, 0, 2, 5, 0, 0, 0, 9};
        assertEquals(29.0 / 16.0, Coverage.mahalanobisSquared(new double[] {1, 2, 3}, cov), MAHALANOBIS_TOL);
        // Diagonal: Σ eᵢ² / σᵢ².
        double[] diag = {1, 0, 0, 0, 4, 0, 0, 0, 16};
        assertEquals(1 + 1 + 1, Coverage.mahalanobisSquared(new double[] {1, -2, 4}, diag), MAHALANOBIS_TOL);
    }

    @Test
    void mahalanobisAgreesWithTheEigenPathOfTheEllipsoid() {
        // Σ = R diag(9, 4, 1) Rᵀ, R a rotation by 40° about (2, −1, 2)/3: Cholesky and eigen paths must agree.
        Affine3D r = Affine3D.rotation(2, -1, 2, Math.toRadians(40));
        double[] lambda = {9, 4, 1};
        double[] cov = new double[9];
        for (int a = 0; a < 3; a++) {
            for (int b = 0; b < 3; b++) {
                double s = 0;
                for (int k = 0; k < 3; k++) {
                    s += r.get(a, k) * lambda[k] * r.get(b, k);
                }
                cov[3 * a + b] = s;
            }
        }
        Ellipsoid e = Ellipsoid.of(new double[] {0, 0, 0}, cov, 0.95);
        double[][] points = {{1, 2, 3}, {-4, 0.5, 2}, {0.1, -0.2, 0.3}};
        for (double[] p : points) {
            double want = e.mahalanobisSquared(p);
            assertEquals(want, Coverage.mahalanobisSquared(p, cov), 1e-10 * Math.max(1, want));
        }
        // Along the first principal axis at distance 3 (one σ = √9): d² = 1.
        double[] v = e.axis(0);
        assertEquals(1.0, Coverage.mahalanobisSquared(new double[] {3 * v[0], 3 * v[1], 3 * v[2]}, cov), 1e-10);
    }

    @Test
    void gaussianErrorsFallInsideThe95PercentEllipsoidAt95Percent() {
        // e = L z with z standard normal has covariance L Lᵀ; d² ~ χ²₃, so P(d² ≤ χ²₃(0.95)) = 0.95.
        double[] l = {3, 0, 0, 1, 2, 0, -0.5, 0.7, 1.2};
        double[] cov = new double[9];
        for (int a = 0; a < 3; a++) {
            for (int b = 0; b < 3; b++) {
                double s = 0;
                for (int k = 0; k < 3; k++) {
                    s += l[3 * a + k] * l[3 * b + k];
                }
                cov[3 * a + b] = s;
            }
        }
        double chi2 = Ellipsoid.chiSquare3(0.95);
        Random rnd = new Random(20261202L);
        int inside = 0;
        double sum = 0;
        for (int n = 0; n < DRAWS; n++) {
            double z0 = rnd.nextGaussian();
            double z1 = rnd.nextGaussian();
            double z2 = rnd.nextGaussian();
            double[] e = {l[0] * z0, l[3] * z0 + l[4] * z1, l[6] * z0 + l[7] * z1 + l[8] * z2};
            double d2 = Coverage.mahalanobisSquared(e, cov);
            sum += d2;
            if (d2 <= chi2) {
                inside++;
            }
        }
        assertEquals(0.95, inside / (double) DRAWS, COVERAGE_TOL);
        // Mean of χ²₃ is 3, SD of the mean √(6/40000) ≈ 0.012; four SDs.
        assertEquals(3.0, sum / DRAWS, 4 * Math.sqrt(6.0 / DRAWS));
    }

    @Test
    void singularOrMalformedCovarianceIsRefused() {
        double[] rankTwo = {1, 1, 0, 1, 1, 0, 0, 0, 1};
        assertThrows(IllegalArgumentException.class, () -> Coverage.mahalanobisSquared(new double[] {1, 0, 0}, rankTwo));
        assertThrows(IllegalArgumentException.class, () -> Coverage.mahalanobisSquared(new double[] {1, 0, 0},
                new double[9]));
        assertThrows(IllegalArgumentException.class, () -> Coverage.mahalanobisSquared(new double[] {1, 0},
                new double[] {1, 0, 0, 0, 1, 0, 0, 0, 1}));
        assertThrows(IllegalArgumentException.class, () -> Coverage.mahalanobisSquared(new double[] {Double.NaN, 0, 0},
                new double[] {1, 0, 0, 0, 1, 0, 0, 0, 1}));
    }

    @Test
    void clopperPearsonAtTheEndsMatchesTheClosedForm() {
        // x = 0: upper = 1 − (α/2)^(1/n); x = n: lower = (α/2)^(1/n) (closed form of the beta quantile
        // B(q; 1, n) = 1 − (1 − q)^(1/n); Clopper & Pearson 1934).
        Coverage.Interval zero = Coverage.clopperPearson(0, 10, 0.95);
        assertEquals(0.0, zero.lower());
        assertEquals(0.3085, zero.upper(), 5e-5); // the usual four-decimal value of 0/10
        for (int n : new int[] {1, 7, 10, 50, 200}) {
            Coverage.Interval none = Coverage.clopperPearson(0, n, 0.95);
            assertEquals(1 - Math.pow(0.025, 1.0 / n), none.upper(), QUANTILE_TOL, "x = 0, n = " + n);
            Coverage.Interval all = Coverage.clopperPearson(n, n, 0.95);
            assertEquals(Math.pow(0.025, 1.0 / n), all.lower(), QUANTILE_TOL, "x = n = " + n);
            assertEquals(1.0, all.upper());
        }
    }

    @Test
    void clopperPearsonMatchesSciPy() {
        // app/src/test/resources/uncertainty/clopper_pearson.py (SciPy beta.ppf, cross-checked there
        // against the roots of the binomial tail equations). 1/10 → (0.0025, 0.4450) and 5/10 →
        // (0.1871, 0.8129) are also the widely tabulated four-decimal values.
        double[][] ref = {
            {1, 10, 0.002528578544, 0.445016117028},
            {5, 10, 0.187086028447, 0.812913971553},
            {19, 20, 0.751267237228, 0.998734910502},
            {95, 100, 0.887165088895, 0.983568120818},
            {18, 40, 0.292588350040, 0.615093205466},
        };
        for (double[] r : ref) {
            Coverage.Interval ci = Coverage.clopperPearson((int) r[0], (int) r[1], 0.95);
            assertEquals(r[2], ci.lower(), QUANTILE_TOL, (int) r[0] + "/" + (int) r[1] + " lower");
            assertEquals(r[3], ci.upper(), QUANTILE_TOL, (int) r[0] + "/" + (int) r[1] + " upper");
            assertTrue(ci.lower() < r[0] / r[1] && r[0] / r[1] < ci.upper());
        }
    }

    @Test
    void clopperPearsonRejectsImpossibleCounts() {
        assertThrows(IllegalArgumentException.class, () -> Coverage.clopperPearson(3, 2, 0.95));
        assertThrows(IllegalArgumentException.class, () -> Coverage.clopperPearson(-1, 2, 0.95));
        assertThrows(IllegalArgumentException.class, () -> Coverage.clopperPearson(0, 0, 0.95));
        assertThrows(IllegalArgumentException.class, () -> Coverage.clopperPearson(1, 2, 1.0));
    }
}
