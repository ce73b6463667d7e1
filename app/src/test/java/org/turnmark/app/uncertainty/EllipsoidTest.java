package org.turnmark.app.uncertainty;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;

class EllipsoidTest {

    /** The handbook table gives 5 decimals: half a unit in the last place. */
    private static final double TABLE_ROUNDING = 5e-6;
    /** Eigen-decomposition of a well-conditioned 3×3 (condition 9): round-off of a few ulps × 9. */
    private static final double EIGEN_TOL = 1e-10;

    @Test
    void chiSquareQuantilesMatchTheNistSematechTable() {
        // NIST/SEMATECH e-Handbook of Statistical Methods §1.3.6.7.4, upper critical values of the
        // chi-square distribution, ν = 3.
        assertEquals(6.25139, Ellipsoid.chiSquare3(0.90), TABLE_ROUNDING);
        assertEquals(7.81473, Ellipsoid.chiSquare3(0.95), TABLE_ROUNDING);
        assertEquals(11.34487, Ellipsoid.chiSquare3(0.99), TABLE_ROUNDING);
    }

    @Test
    void semiAxesAndDirectionsOfARotatedCovariance() {
        // Σ = R diag(9, 4, 1) Rᵀ with R a rotation by 30° about (1, 2, 2)/3: closed form √(χ²₃ λ).
        Affine3D r = Affine3D.rotation(1, 2, 2, Math.toRadians(30));
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
        Ellipsoid e = Ellipsoid.of(new double[] {10, -20, 30}, cov, 0.95);
        double chi2 = 7.81473; // NIST/SEMATECH §1.3.6.7.4
        for (int i = 0; i < 3; i++) {
            assertEquals(Math.sqrt(chi2 * lambda[i]), e.semiAxesMm()[i], 1e-5 * Math.sqrt(lambda[i]));
            double[] v = e.axis(i);
            double dot = v[0] * r.get(0, i) + v[1] * r.get(1, i) + v[2] * r.get(2, i);
            assertEquals(1.0, Math.abs(dot), EIGEN_TOL, "axis " + i + " along column " + i + " of R");
        }
        // Points on the boundary along each axis: inside just within, outside just beyond.
        for (int i = 0; i < 3; i++) {
            double[] v = e.axis(i);
            double a = e.semiAxesMm()[i];
            assertTrue(e.contains(new double[] {10 + 0.999 * a * v[0], -20 + 0.999 * a * v[1], 30 + 0.999 * a * v[2]}));
            assertFalse(e.contains(new double[] {10 + 1.001 * a * v[0], -20 + 1.001 * a * v[1], 30 + 1.001 * a * v[2]}));
        }
    }

    @Test
    void gaussianSamplesFallInsideAtTheStatedRate() {
        // Monte Carlo: 20000 draws of N(0, Σ); coverage of the 95 % ellipsoid is binomial with
        // sd √(0.95·0.05/20000) = 0.0015; 4 sd = 0.006.
        double[] cov = {4, 1, 0, 1, 3, -0.5, 0, -0.5, 2};
        Ellipsoid e = Ellipsoid.of(new double[3], cov, 0.95);
        // Cholesky factor of Σ, by hand.
        double l00 = Math.sqrt(cov[0]);
        double l10 = cov[3] / l00;
        double l11 = Math.sqrt(cov[4] - l10 * l10);
        double l20 = cov[6] / l00;
        double l21 = (cov[7] - l20 * l10) / l11;
        double l22 = Math.sqrt(cov[8] - l20 * l20 - l21 * l21);
        Random rnd = new Random(7);
        int inside = 0;
        int n = 20000;
        for (int s = 0; s < n; s++) {
            double z0 = rnd.nextGaussian();
            double z1 = rnd.nextGaussian();
            double z2 = rnd.nextGaussian();
            double[] x = {l00 * z0, l10 * z0 + l11 * z1, l20 * z0 + l21 * z1 + l22 * z2};
            if (e.contains(x)) {
                inside++;
            }
        }
        assertEquals(0.95, inside / (double) n, 0.006);
    }

    @Test
    void degenerateCovarianceHasZeroAxisAndRejectsOffAxisPoints() {
        double[] cov = {4, 0, 0, 0, 1, 0, 0, 0, 0};
        Ellipsoid e = Ellipsoid.of(new double[3], cov, 0.95);
        assertEquals(0.0, e.semiAxesMm()[2], 0.0);
        assertTrue(e.contains(new double[] {1, 0, 0}));
        assertFalse(e.contains(new double[] {0, 0, 0.1}));
    }

    @Test
    void invalidCovarianceIsRejected() {
        assertThrows(IllegalArgumentException.class,
                () -> Ellipsoid.of(new double[3], new double[] {1, 2, 0, 0, 1, 0, 0, 0, 1}, 0.95));
        assertThrows(IllegalArgumentException.class,
                () -> Ellipsoid.of(new double[3], new double[] {-1, 0, 0, 0, 1, 0, 0, 0, 1}, 0.95));
        assertThrows(IllegalArgumentException.class, () -> Ellipsoid.chiSquare3(1.0));
    }

    @Test
    void covariancePropagationThroughALinearMapIsExact() {
        // J Σ Jᵀ for J = diag(2, 1, 1) rotated: closed form for isotropic Σ = σ² I is σ² J Jᵀ.
        double[] j = {2, 0, 0, 0, 0, -1, 0, 1, 0};
        double[] out = Covariance3.propagate(j, Covariance3.isotropic(1.5));
        double[] expected = {9, 0, 0, 0, 2.25, 0, 0, 0, 2.25};
        for (int n = 0; n < 9; n++) {
            assertEquals(expected[n], out[n], 1e-12);
        }
    }

    @Test
    void covarianceAboutReferenceAddsTheOffsetOfTheMean() {
        double[][] s = {{1, 0, 0}, {-1, 0, 0}, {1, 0, 0}, {-1, 0, 0}};
        double[] cov = Covariance3.aboutReference(s, new double[] {0, 2, 0});
        // Sample variance along x: 4 / 3; mean offset (0, -2, 0) adds 4 to yy.
        assertEquals(4.0 / 3.0, cov[0], 1e-12);
        assertEquals(4.0, cov[4], 1e-12);
        assertEquals(0.0, cov[1], 1e-12);
    }
}
