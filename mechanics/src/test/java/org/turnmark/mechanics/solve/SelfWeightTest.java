package org.turnmark.mechanics.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.HexMesh;

/**
 * Self-weight: a laterally confined column standing on a rigid base and a bar hanging from its top,
 * against the linear closed forms at small load (Timoshenko &amp; Goodier, Theory of Elasticity) and
 * against a 1-D numerical integration of the exact neo-Hookean equilibrium at large load.
 *
 * <p>Derivation of the 1-D equations (reference coordinate Z, dead body force ρ₀g per reference
 * volume, nominal stress P): equilibrium of the part of the body beyond a cross-section gives
 * P₃₃(Z) = ∓ρ₀g·(length beyond Z) exactly, for any constitutive law. Confined column: F = diag(1,
 * 1, λ(Z)), so P₃₃ = μλ^(−2/3)(λ − (λ² + 2)/(3λ)) + (κ/2)(λ² − 1)/λ is solved for λ at each Z;
 * hanging bar (1-D rod theory, lateral faces free): each section is in uniaxial stress,
 * F = diag(b, b, a) with P₁₁ = 0, solved for (a, b). The end displacement is ∫(λ − 1)dZ (composite
 * Simpson rule, 2000 intervals: quadrature error ≪ 1e−8 relative).
 */
class SelfWeightTest {

    static final double MU = 1.0;
    static final double RHO = 1000;
    static final double H = 100;
    static final double SIDE = 5;

    /** Column of 1 × 1 × nz elements, SIDE × SIDE × H mm. */
    private static HexMesh column(int nz) {
        return TestMeshes.box(1, 1, nz, SIDE, SIDE, H);
    }

    /** Confined column: walls x = 0, x = SIDE, y = 0, y = SIDE slide; base z = 0 slides on z. */
    private static double confinedTopSettlement(NeoHookeanMaterial mat, double g, int nz) {
        HexMesh mesh = column(nz);
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        double[] x = mesh.xyzMm();
        for (int n = 0; n < mesh.nodeCount(); n++) {
            boolean base = x[3 * n + 2] == 0;
            // every node lies on two walls (one element across): it moves along z only, base nodes are fixed
            if (base) {
                bc.fix(n);
            } else {
                bc.guide(n, 0, 0, 1);
            }
        }
        SolveResult r = HyperelasticSolver.solve(mesh, MaterialTable.uniform(mat), bc, new double[] {0, 0, -g},
                SolverConfig.defaults().withTolerances(1e-9, 1e-16), Progress.NONE, null);
        int top = TestMeshes.node(1, 1, 1, 1, nz);
        return -r.u()[3 * top + 2];
    }

    /** Bar hanging from z = H (top face slides on z), quarter model with symmetry planes x = 0, y = 0. */
    private static double hangingTipDrop(NeoHookeanMaterial mat, double g, int nz) {
        HexMesh mesh = column(nz);
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        double[] x = mesh.xyzMm();
        for (int n = 0; n < mesh.nodeCount(); n++) {
            boolean bx = x[3 * n] == 0;
            boolean by = x[3 * n + 1] == 0;
            boolean bz = x[3 * n + 2] == H;
            int c = (bx ? 1 : 0) + (by ? 1 : 0) + (bz ? 1 : 0);
            if (c == 3) {
                bc.fix(n);
            } else if (c == 2) {
                bc.guide(n, bx ? 0 : 1, by ? 0 : 1, bz ? 0 : 1);
            } else if (c == 1) {
                bc.slide(n, bx ? 1 : 0, by ? 1 : 0, bz ? 1 : 0);
            }
        }
        SolveResult r = HyperelasticSolver.solve(mesh, MaterialTable.uniform(mat), bc, new double[] {0, 0, -g},
                SolverConfig.defaults().withTolerances(1e-9, 1e-16), Progress.NONE, null);
        // mean drop of the free end (z = 0) face
        double s = 0;
        for (int j = 0; j <= 1; j++) {
            for (int i = 0; i <= 1; i++) {
                s += -r.u()[3 * TestMeshes.node(1, 1, i, j, 0) + 2];
            }
        }
        return s / 4;
    }

    /** ∫₀ᴴ (1 − λ(Z)) dZ for the confined column, λ from P₃₃(λ) = −ρg(H − Z). */
    private static double confinedSettlement1d(NeoHookeanMaterial mat, double g) {
        double w = RHO * g * 1e-6;
        return simpson(z -> {
            double p = -w * (H - z);
            double lam = 1;
            for (int it = 0; it < 60; it++) {
                double[] f = {1, 1, lam};
                double r = HomogeneousStressTest.nominal(mat.muKpa(), mat.kappaKpa(), f, 2) - p;
                double h = 1e-7;
                f[2] = lam + h;
                double d = (HomogeneousStressTest.nominal(mat.muKpa(), mat.kappaKpa(), f, 2) - p - r) / h;
                lam -= r / d;
            }
            return 1 - lam;
        });
    }

    /** ∫₀ᴴ (a(Z) − 1) dZ for the hanging bar, a from uniaxial P₃₃(a) = ρgZ. */
    private static double hangingDrop1d(NeoHookeanMaterial mat, double g) {
        double w = RHO * g * 1e-6;
        return simpson(z -> HomogeneousStressTest.homogeneous(mat.muKpa(), mat.kappaKpa(), w * z, false)[0] - 1);
    }

    private static double simpson(java.util.function.DoubleUnaryOperator f) {
        int n = 2000;
        double h = H / n;
        double s = f.applyAsDouble(0) + f.applyAsDouble(H);
        for (int i = 1; i < n; i++) {
            s += (i % 2 == 1 ? 4 : 2) * f.applyAsDouble(i * h);
        }
        return s * h / 3;
    }

    /**
     * Small load (ρgH/M ≈ 2e−6): settlement ρgH²/(2M), M = κ + 4μ/3 (Timoshenko &amp; Goodier; exact
     * in 1-D linear elasticity). Linear elements reproduce 1-D nodal values of this quadratic field
     * exactly; the remaining difference is the geometric nonlinearity, relative O(ρgH/M): tolerance
     * 1e−4 relative.
     */
    @Test
    void confinedColumnMatchesLinearClosedFormAtSmallLoad() {
        NeoHookeanMaterial mat = NeoHookeanMaterial.ofMuNu(MU, 0.45, RHO);
        double g = 0.01;
        double m = mat.kappaKpa() + 4 * MU / 3;
        double expected = RHO * g * 1e-6 * H * H / (2 * m);
        assertEquals(expected, confinedTopSettlement(mat, g, 10), 1e-4 * expected);
    }

    /**
     * Large load (ν = 0.3, g = 15 m/s², ρgH/M ≈ 0.4: about 30 % compression at the base): the FE settlement converges to the
     * 1-D integral at second order in h; observed with 10 and 20 elements, and the 20-element error
     * is below 1 % (a quarter of the 10-element error bound).
     */
    @Test
    void confinedColumnMatchesOneDimensionalNeoHookeanAtLargeLoad() {
        NeoHookeanMaterial mat = NeoHookeanMaterial.ofMuNu(MU, 0.3, RHO);
        double g = 15;
        double exact = confinedSettlement1d(mat, g);
        double e10 = Math.abs(confinedTopSettlement(mat, g, 10) - exact);
        double e20 = Math.abs(confinedTopSettlement(mat, g, 20) - exact);
        assertTrue(exact > 0.1 * H, "the load must be large: settlement " + exact + " mm");
        assertTrue(e20 < e10 / 3, "second-order convergence: errors " + e10 + ", " + e20 + " mm");
        assertTrue(e20 < 0.01 * exact, "error " + e20 + " of " + exact + " mm");
    }

    /**
     * Small load: free-end drop ρgL²/(2E) (Timoshenko &amp; Goodier, bar hanging under its own
     * weight). The planar sliding top face and one element across add a relative error of order
     * ν(a/L)² ≈ 1e−3 (a = side): tolerance 1 %.
     */
    @Test
    void hangingBarMatchesLinearClosedFormAtSmallLoad() {
        NeoHookeanMaterial mat = NeoHookeanMaterial.ofMuNu(MU, 0.3, RHO);
        double g = 0.01;
        double expected = RHO * g * 1e-6 * H * H / (2 * mat.youngKpa());
        assertEquals(expected, hangingTipDrop(mat, g, 10), 0.01 * expected);
    }

    /**
     * Large load (about 30 % stretch at the top): the drop against 1-D rod theory; the 3-D solution
     * differs from the rod by end effects of relative order (a/L)² and by discretisation (20
     * elements, second order): tolerance 2 %.
     */
    @Test
    void hangingBarMatchesOneDimensionalNeoHookeanAtLargeLoad() {
        NeoHookeanMaterial mat = NeoHookeanMaterial.ofMuNu(MU, 0.3, RHO);
        double g = 9.81;
        double exact = hangingDrop1d(mat, g);
        assertTrue(exact > 0.1 * H, "the load must be large: drop " + exact + " mm");
        assertEquals(exact, hangingTipDrop(mat, g, 20), 0.02 * exact);
    }
}
