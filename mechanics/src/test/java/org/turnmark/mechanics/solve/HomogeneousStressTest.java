package org.turnmark.mechanics.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.element.HexFormulation;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.HexMesh;

/**
 * Homogeneous stress states: a box with symmetry planes loaded by uniform dead tractions must
 * deform homogeneously, F = diag(a, b, c), for any mesh (patch test) and with the stress of the
 * exact homogeneous solution of the compressible law, which this test computes itself by Newton's
 * method on the two scalar equilibrium equations (derived below). In the near-incompressible limit
 * the Cauchy stress must approach Ogden's closed forms (Ogden, Non-linear Elastic Deformations,
 * 1984): uniaxial σ = μ(λ² − λ⁻¹), equibiaxial σ = μ(λ² − λ⁻⁴).
 */
class HomogeneousStressTest {

    /**
     * Newton is run to a relative force residual of 1e−11 with linear solves to 1e−12; the
     * displacement error is then ~1e−11 × cond(K) (≈1e2–1e3 for these 27–64-element boxes at
     * ν = 0.3) × size (10 mm): below 1e−7 mm; "round-off level" relative to 10 mm.
     */
    static final double HOMOGENEOUS_TOLERANCE_MM = 1e-7;

    static final double L = 10;

    private static SolverConfig tight(HexFormulation f) {
        return SolverConfig.defaults().withFormulation(f).withTolerances(1e-11, 1e-20)
                .withLinearSolver(LinearSolverKind.PCG_MULTIGRID, 1e-12).withLoadSteps(4);
    }

    /**
     * Nominal stress of the compressible law for F = diag(f1, f2, f3):
     * P_ii = μ J^(−2/3) (f_i − I₁/(3 f_i)) + (κ/2)(J² − 1)/f_i,  J = f1 f2 f3, I₁ = Σ f_i²
     * (from P = μ J^(−2/3)(F − (I₁/3) F⁻ᵀ) + U'(J) J F⁻ᵀ with U'(J) J = (κ/2)(J² − 1)).
     */
    static double nominal(double mu, double kappa, double[] f, int i) {
        double j = f[0] * f[1] * f[2];
        double i1 = f[0] * f[0] + f[1] * f[1] + f[2] * f[2];
        return mu * Math.pow(j, -2.0 / 3) * (f[i] - i1 / (3 * f[i])) + 0.5 * kappa * (j * j - 1) / f[i];
    }

    /**
     * Exact homogeneous solution: stretches (a, b) with P11 = p (and P22 = p if biaxial, else 0)
     * and the free direction(s) traction-free, by 2-D Newton with a finite-difference Jacobian.
     */
    static double[] homogeneous(double mu, double kappa, double p, boolean biaxial) {
        double a = 1;
        double b = 1;
        for (int it = 0; it < 100; it++) {
            double[] r = residual(mu, kappa, p, biaxial, a, b);
            if (Math.abs(r[0]) + Math.abs(r[1]) < 1e-14 * (mu + kappa)) {
                break;
            }
            double h = 1e-7;
            double[] ra = residual(mu, kappa, p, biaxial, a + h, b);
            double[] rb = residual(mu, kappa, p, biaxial, a, b + h);
            double j11 = (ra[0] - r[0]) / h;
            double j21 = (ra[1] - r[1]) / h;
            double j12 = (rb[0] - r[0]) / h;
            double j22 = (rb[1] - r[1]) / h;
            double det = j11 * j22 - j12 * j21;
            a -= (j22 * r[0] - j12 * r[1]) / det;
            b -= (-j21 * r[0] + j11 * r[1]) / det;
        }
        return biaxial ? new double[] {a, a, b} : new double[] {a, b, b};
    }

    private static double[] residual(double mu, double kappa, double p, boolean biaxial, double a, double b) {
        double[] f = biaxial ? new double[] {a, a, b} : new double[] {a, b, b};
        return new double[] {nominal(mu, kappa, f, 0) - p, nominal(mu, kappa, f, 2)};
    }

    private static SolveResult solveBox(HexMesh mesh, int n, NeoHookeanMaterial mat, double p, boolean biaxial,
                                        HexFormulation form) {
        return solveBox(mesh, n, mat, p, biaxial, tight(form));
    }

    private static SolveResult solveBox(HexMesh mesh, int n, NeoHookeanMaterial mat, double p, boolean biaxial,
                                        SolverConfig cfg) {
        double[] loads = new double[3 * mesh.nodeCount()];
        BoxProblems.addFaceTraction(mesh, n, n, n, 0, new double[] {p, 0, 0}, loads);
        if (biaxial) {
            BoxProblems.addFaceTraction(mesh, n, n, n, 1, new double[] {0, p, 0}, loads);
        }
        NodeConstraints bc = BoxProblems.symmetryPlanes(n, n, n, true);
        return HyperelasticSolver.solve(mesh, MaterialTable.uniform(mat), bc, new double[3],
                cfg.withNodalForces(loads), Progress.NONE, null);
    }

    private static void assertHomogeneous(HexMesh mesh, double[] u, double[] f) {
        double[] x = mesh.xyzMm();
        for (int nd = 0; nd < mesh.nodeCount(); nd++) {
            for (int d = 0; d < 3; d++) {
                assertEquals((f[d] - 1) * x[3 * nd + d], u[3 * nd + d], HOMOGENEOUS_TOLERANCE_MM,
                        "node " + nd + " component " + d);
            }
        }
    }

    /** Patch test: a distorted 3×3×3 mesh reproduces the homogeneous uniaxial solution. */
    @ParameterizedTest
    @EnumSource(HexFormulation.class)
    void distortedPatchReproducesHomogeneousUniaxialTension(HexFormulation form) {
        NeoHookeanMaterial mat = NeoHookeanMaterial.ofMuNu(1.0, 0.3, 1000);
        double p = 0.8; // kPa nominal: a stretch of about 1.25
        HexMesh mesh = BoxProblems.distortedBox(3, 3, 3, L, L, L, 0.5, 5);
        SolveResult r = solveBox(mesh, 3, mat, p, false, form);
        double[] f = homogeneous(mat.muKpa(), mat.kappaKpa(), p, false);
        assertTrue(f[0] > 1.2, "the test must be in the nonlinear range, stretch " + f[0]);
        assertHomogeneous(mesh, r.u(), f);
    }

    @Test
    void uniaxialTensionMatchesExactCompressibleSolution() {
        NeoHookeanMaterial mat = NeoHookeanMaterial.ofMuNu(1.0, 0.45, 1000);
        double p = 1.5;
        HexMesh mesh = TestMeshes.box(2, 2, 2, L, L, L);
        SolveResult r = solveBox(mesh, 2, mat, p, false, HexFormulation.MEAN_DILATATION);
        assertHomogeneous(mesh, r.u(), homogeneous(mat.muKpa(), mat.kappaKpa(), p, false));
    }

    @Test
    void equibiaxialTensionMatchesExactCompressibleSolution() {
        NeoHookeanMaterial mat = NeoHookeanMaterial.ofMuNu(1.0, 0.45, 1000);
        double p = 1.0;
        HexMesh mesh = TestMeshes.box(2, 2, 2, L, L, L);
        SolveResult r = solveBox(mesh, 2, mat, p, true, HexFormulation.MEAN_DILATATION);
        assertHomogeneous(mesh, r.u(), homogeneous(mat.muKpa(), mat.kappaKpa(), p, true));
    }

    /**
     * Near-incompressible limit against Ogden's incompressible closed forms. With κ/μ = 5000
     * (ν = 0.4999), J − 1 = O(σ/κ), and σ differs from the incompressible value at the same stretch
     * by O(σ/κ) relative plus O(μ(J − 1)): tolerance 10·max(|σ|, μ)/κ relative, i.e. 2e−3. The
     * default Newton tolerance (relative residual 1e−6) is ample for this; the tight one of the
     * other tests lies below the round-off floor of κ/μ = 5000.
     */
    @Test
    void nearIncompressibleStressApproachesOgdenClosedForms() {
        double mu = 1.0;
        NeoHookeanMaterial mat = NeoHookeanMaterial.ofMuNu(mu, 0.4999, 1000);
        double kappa = mat.kappaKpa();
        HexMesh mesh = TestMeshes.box(2, 2, 2, L, L, L);
        for (boolean biaxial : new boolean[] {false, true}) {
            double p = 1.2;
            SolveResult r = solveBox(mesh, 2, mat, p, biaxial, SolverConfig.defaults().withLoadSteps(4));
            int corner = TestMeshes.node(2, 2, 2, 2, 2);
            double a = 1 + r.u()[3 * corner] / L;
            double b = 1 + r.u()[3 * corner + 1] / L;
            double c = 1 + r.u()[3 * corner + 2] / L;
            double j = a * b * c;
            double sigma = p * a / j; // σ11 = P11 F11 / J for diagonal F
            double ogden = biaxial ? mu * (a * a - Math.pow(a, -4)) : mu * (a * a - 1 / a);
            double tol = 10 * Math.max(Math.abs(sigma), mu) / kappa;
            assertTrue(Math.abs(j - 1) < 1e-3, "near-incompressible: J = " + j);
            assertEquals(ogden, sigma, tol * Math.abs(ogden), biaxial ? "equibiaxial" : "uniaxial");
        }
    }
}
