package org.turnmark.registration.transform;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;

class VelocityFieldsTest {

    private static final Grid3 GRID = Grid3.axisAligned(40, 40, 40, 1, 1, 1, -20, -20, -20);
    /** Interior voxels used for map comparisons: far enough from the border that no flow reaches it. */
    private static final int MARGIN = 10;
    /** RK4 steps for the reference flow: local error O(h⁵) with h = 1/400 is far below float storage. */
    private static final int RK4_STEPS = 400;

    /**
     * Global error bound of the explicit first step id + v/2^N after 2^N doublings (first-order
     * scheme): ½·max|v|·‖Dv‖·e^‖Dv‖ / 2^N with max|v| = 3√3 mm and ‖Dv‖ = 3·2π/32 = 0.59 per mm for the
     * field below, i.e. 2.75 mm / 2^N.
     */
    private static final double EULER_BOUND_MM = 2.75;
    /**
     * Floor from trilinear sampling of the field: h²/8·Σ|∂²v/∂x_a²| = 3·(2π/32)²/8 ≈ 0.0145 mm per
     * sample, accumulated over ≤ 4 squarings with growth e^0.59: ≈ 0.10 mm.
     */
    private static final double INTERPOLATION_FLOOR_MM = 0.10;
    /** Observed halving of the error per squaring before the floor: first order means a ratio near 2. */
    private static final double FIRST_ORDER_RATIO_MIN = 1.7;

    private static double[] errorsAgainstRk4(TestFields.Analytic f, VectorField disp) {
        double sum = 0;
        double max = 0;
        int count = 0;
        double[] mapped = new double[3];
        for (int k = MARGIN; k < GRID.nz() - MARGIN; k += 3) {
            for (int j = MARGIN; j < GRID.ny() - MARGIN; j += 3) {
                for (int i = MARGIN; i < GRID.nx() - MARGIN; i += 3) {
                    double[] p = GRID.worldOf(i, j, k);
                    double[] ref = TestFields.rk4(f, p, RK4_STEPS);
                    DisplacementFields.applyToPoint(disp, p, mapped);
                    double e = Math.sqrt(sq(mapped[0] - ref[0]) + sq(mapped[1] - ref[1]) + sq(mapped[2] - ref[2]));
                    sum += e;
                    max = Math.max(max, e);
                    count++;
                }
            }
        }
        return new double[] {sum / count, max};
    }

    private static double sq(double a) {
        return a * a;
    }

    @Test
    void scalingAndSquaringConvergesToRungeKuttaFlow() {
        // Reference: classical RK4 integration of dx/dt = v(x), t ∈ [0, 1], with the analytic v
        // (closed-form field, no sampling); scaling and squaring after Arsigny et al. 2006.
        TestFields.Analytic f = TestFields.sine(3.0, 32.0, 0.3);
        VectorField v = TestFields.sample(f, GRID);
        int auto = VelocityFields.squaringsFor(v);
        // max|v| ≈ 3√3·… ≤ 5.2 mm → 4 squarings for steps ≤ 0.5 mm.
        assertTrue(auto >= 3 && auto <= 5, "automatic squarings " + auto);
        double[] previous = null;
        for (int n = 0; n <= auto + 2; n++) {
            VectorField out = VectorField.zeros(GRID);
            VelocityFields.exp(v, n, out, VectorField.zeros(GRID));
            double[] e = errorsAgainstRk4(f, out);
            double tol = EULER_BOUND_MM / Math.pow(2, n) + INTERPOLATION_FLOOR_MM;
            assertTrue(e[1] < tol, "N=" + n + ": max error " + e[1] + " mm exceeds " + tol + " mm");
            if (previous != null) {
                assertTrue(e[0] < previous[0], "mean error must shrink with squarings: N=" + n + " " + e[0]
                        + " mm vs " + previous[0] + " mm");
                if (n <= 3) {
                    assertTrue(previous[0] / e[0] > FIRST_ORDER_RATIO_MIN, "first-order convergence at N=" + n
                            + ": ratio " + previous[0] / e[0]);
                }
            }
            previous = e;
        }
    }

    /**
     * exp(v) ∘ exp(−v) = id in the continuum. Requirement: inverse consistency well below one voxel
     * (1 mm) for registration use (common practice): 0.2 mm. Each factor is within ≈ 0.09 mm of its
     * flow (RK4 test above), so a correct implementation passes with margin.
     */
    private static final double INVERSE_TOL_MM = 0.2;

    @Test
    void expOfMinusVInvertsExpOfV() {
        // Closed form: exp(v)∘exp(−v) = id (one-parameter subgroup).
        VectorField v = TestFields.sample(TestFields.sine(3.0, 32.0, 0.3), GRID);
        VectorField fwd = VelocityFields.exp(v);
        VectorField inv = VelocityFields.expInverse(v);
        VectorField both = DisplacementFields.compose(fwd, inv);
        double max = 0;
        for (int k = MARGIN; k < GRID.nz() - MARGIN; k++) {
            for (int j = MARGIN; j < GRID.ny() - MARGIN; j++) {
                for (int i = MARGIN; i < GRID.nx() - MARGIN; i++) {
                    int n = GRID.index(i, j, k);
                    max = Math.max(max, Math.sqrt(sq(both.x()[n]) + sq(both.y()[n]) + sq(both.z()[n])));
                }
            }
        }
        assertTrue(max < INVERSE_TOL_MM, "|exp(v)∘exp(−v) − id| = " + max + " mm");
        assertTrue(DisplacementFields.maxNormMm(fwd) > 2.0, "the map itself must be large (non-trivial)");
    }

    @Test
    void expOfLargeSmoothFieldDoesNotFold() {
        // Amplitude 8 mm at wavelength 32 mm: max|Dv| = 8·2π/32 ≈ 1.57 > 1, so x + v(x) folds while the
        // flow of v is a diffeomorphism (ODE theory); its Jacobian determinant must stay > 0.
        VectorField v = TestFields.sample(TestFields.sine(8.0, 32.0, 0.0), GRID);
        JacobianStats direct = Jacobians.summarize(Jacobians.determinant(v), null);
        assertTrue(direct.minDet() <= 0, "sanity: x + v(x) itself folds, min det " + direct.minDet());
        JacobianStats flow = Jacobians.summarize(Jacobians.determinant(VelocityFields.exp(v)), null);
        assertTrue(flow.minDet() > 0, "exp(v) folds: min det J = " + flow.minDet());
    }

    @Test
    void squaringsRuleKeepsFirstStepBelowHalfVoxel() {
        VectorField v = TestFields.sample(TestFields.sine(3.0, 32.0, 0.3), GRID);
        int n = VelocityFields.squaringsFor(v);
        double max = DisplacementFields.maxNormMm(v);
        assertTrue(max / Math.pow(2, n) <= 0.5, "step after scaling");
        assertTrue(max / Math.pow(2, n - 1) > 0.5, "N is the least such number");
        assertEquals(0, VelocityFields.squaringsFor(VectorField.zeros(GRID)));
    }

    /** Float storage of fields of size ≤ 10 mm through two difference quotients: 1e-4 mm bound. */
    private static final double LINEAR_BRACKET_TOL = 1e-4;

    @Test
    void lieBracketOfLinearFieldsIsMatrixCommutator() {
        // Closed form: for v = A x, w = B x, (Dv)w − (Dw)v = (AB − BA) x.
        double[] a = {0.03, 0.06, -0.09, 0.12, -0.03, 0.06, 0.00, 0.09, 0.06};
        double[] b = {-0.06, 0.03, 0.00, 0.03, 0.09, -0.06, 0.06, 0.00, -0.03};
        Grid3 g = TestFields.oblique(7, 8, 9);
        VectorField v = DisplacementFields.fromAffine(linear(a), g);
        VectorField w = DisplacementFields.fromAffine(linear(b), g);
        VectorField br = VectorField.zeros(g);
        VelocityFields.lieBracket(v, w, br);
        double[] c = new double[9];
        for (int r = 0; r < 3; r++) {
            for (int q = 0; q < 3; q++) {
                for (int s = 0; s < 3; s++) {
                    c[3 * r + q] += a[3 * r + s] * b[3 * s + q] - b[3 * r + s] * a[3 * s + q];
                }
            }
        }
        VectorField expected = DisplacementFields.fromAffine(linear(c), g);
        double max = 0;
        for (int n = 0; n < g.size(); n++) {
            max = Math.max(max, Math.abs(br.x()[n] - expected.x()[n]));
            max = Math.max(max, Math.abs(br.y()[n] - expected.y()[n]));
            max = Math.max(max, Math.abs(br.z()[n] - expected.z()[n]));
        }
        assertTrue(max < LINEAR_BRACKET_TOL, "bracket error " + max + " mm");
        assertTrue(DisplacementFields.maxNormMm(expected) > 0.1, "commutator must not vanish (non-trivial)");
    }

    /** x ↦ x + M x as an affine (so that fromAffine gives u = M x). */
    private static Affine3D linear(double[] m) {
        return new Affine3D(1 + m[0], m[1], m[2], 0, m[3], 1 + m[4], m[5], 0, m[6], m[7], 1 + m[8], 0);
    }

    @Test
    void bchIsCloserToCompositeThanAddition() {
        // Reference: the composite map exp(v)∘exp(w), built by composing the two flows; the truncated
        // BCH series (Bossa et al. 2007) must approximate it measurably better than v + w.
        VectorField v = TestFields.sample(TestFields.sine(2.5, 32.0, 0.3), GRID);
        VectorField w = TestFields.sample(TestFields.cosine(2.5, 28.0), GRID);
        VectorField target = DisplacementFields.compose(VelocityFields.exp(v), VelocityFields.exp(w));
        VectorField bch = VelocityFields.exp(VelocityFields.compose(v, w, UpdateRule.BCH));
        VectorField sum = VelocityFields.exp(VelocityFields.compose(v, w, UpdateRule.ADDITION));
        double eBch = interiorMeanDistance(bch, target);
        double eSum = interiorMeanDistance(sum, target);
        assertTrue(eBch < 0.5 * eSum, "BCH error " + eBch + " mm vs addition " + eSum + " mm");
        assertTrue(eSum > 0.1, "the fields must not commute (non-trivial case), addition error " + eSum);
    }

    private static double interiorMeanDistance(VectorField p, VectorField q) {
        double s = 0;
        int c = 0;
        for (int k = MARGIN; k < GRID.nz() - MARGIN; k++) {
            for (int j = MARGIN; j < GRID.ny() - MARGIN; j++) {
                for (int i = MARGIN; i < GRID.nx() - MARGIN; i++) {
                    int n = GRID.index(i, j, k);
                    s += Math.sqrt(sq(p.x()[n] - q.x()[n]) + sq(p.y()[n] - q.y()[n]) + sq(p.z()[n] - q.z()[n]));
                    c++;
                }
            }
        }
        return s / c;
    }
}
