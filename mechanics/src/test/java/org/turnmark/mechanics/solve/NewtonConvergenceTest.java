package org.turnmark.mechanics.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.HexMesh;

class NewtonConvergenceTest {

    /**
     * Newton's method with the consistent tangent converges quadratically near the solution:
     * r_{k+1} ≈ C r_k². Observed order p = log(r_{k+1}/r_k) / log(r_k/r_{k−1}) on the last pair of
     * steps whose residual is still above round-off; p ≥ 1.7 leaves room for the
     * inexact linear solves (forcing term proportional to the residual keeps the order 2; Dembo,
     * Eisenstat &amp; Steihaug 1982). A wrong tangent gives p ≈ 1. The three residuals used must all
     * lie in the asymptotic range (below {@link #ASYMPTOTIC}) and above the round-off floor (the
     * residual stalls near 1e−14 relative for this problem; 1e−12 leaves a margin).
     */
    static final double MIN_ORDER = 1.7;
    /**
     * Relative residual below which Newton is in its asymptotic range here: with a wrong tangent
     * the order would be ≈ 1 from any starting level, so a few percent is small enough to tell the
     * two apart while leaving three residuals above the round-off floor.
     */
    static final double ASYMPTOTIC = 0.05;
    static final double ROUNDOFF_FLOOR = 1e-12;

    @Test
    void newtonConvergesQuadraticallyInALargeLoadStep() {
        HexMesh mesh = TestMeshes.box(3, 3, 3, 30, 30, 30);
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        for (int n = 0; n < 16; n++) {
            bc.fix(n);
        }
        MaterialTable mats = MaterialTable.uniform(NeoHookeanMaterial.ofMuNu(0.5, 0.45, 1000));
        SolverConfig cfg = SolverConfig.defaults().withLoadSteps(1).withTolerances(1e-10, 1e-20)
                .withLinearSolver(LinearSolverKind.PCG_MULTIGRID, 1e-13).withMaxNewtonIterations(30);
        SolveResult r = HyperelasticSolver.solve(mesh, mats, bc, new double[] {9.81, 0, -9.81}, cfg, Progress.NONE, null);
        // the whole load in one step from the unloaded state: the tangent at the first, far-off
        // iterates is indefinite, so the solve needs the diagonal shift there (without it this
        // increment failed and was cut), then takes plain Newton steps near the solution
        assertTrue(r.shiftedIterations() > 0 && r.cutSteps() == 0, "shifted steps, no cut: " + r);
        double[] h = r.lastIncrementResiduals();
        assertTrue(h.length >= 4, "several Newton iterations in the last increment: " + h.length);
        int last = -1;
        for (int k = 2; k < h.length; k++) {
            if (h[k] > ROUNDOFF_FLOOR && h[k - 2] < ASYMPTOTIC) {
                last = k;
            }
        }
        assertTrue(last > 0, "no iterations in the asymptotic range: " + java.util.Arrays.toString(h));
        double p = Math.log(h[last] / h[last - 1]) / Math.log(h[last - 1] / h[last - 2]);
        assertTrue(p >= MIN_ORDER, "observed order " + p + " from " + java.util.Arrays.toString(h));
    }

    /** Block-Jacobi and multigrid preconditioning give the same equilibrium (to the solver tolerance). */
    @Test
    void linearSolversAgree() {
        HexMesh mesh = TestMeshes.box(3, 3, 4, 30, 30, 40);
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        for (int n = 0; n < 16; n++) {
            bc.fix(n);
        }
        MaterialTable mats = MaterialTable.uniform(NeoHookeanMaterial.ofMuNu(0.5, 0.49, 1000));
        double[] g = {0, 0, -9.81};
        SolverConfig cfg = SolverConfig.defaults().withTolerances(1e-10, 1e-20);
        double[] a = HyperelasticSolver.solve(mesh, mats, bc, g, cfg, Progress.NONE, null).u();
        double[] b = HyperelasticSolver.solve(mesh, mats, bc, g,
                cfg.withLinearSolver(LinearSolverKind.PCG_BLOCK_JACOBI, 1e-10), Progress.NONE, null).u();
        // relative residual 1e−10 on a problem with cond ≈ 1e4 → displacement error ≲ 1e−6 × |u| (|u| ~ 10 mm)
        assertArrayEquals(a, b, 1e-5);
    }
}
