package org.turnmark.mechanics.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.mechanics.bench.VoxelBreast;
import org.turnmark.mechanics.element.HexFormulation;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.mesh.HexMesh;

class AggregationMultigridTest {

    /**
     * Coarse operators after a shifted refresh are the Galerkin products of the shifted matrix:
     * zᵀ A_c y = (P z)ᵀ (A + σI) (P y) for random coarse vectors, on every coarse level (P the
     * product of the prolongators down to the finest level). Both sides add the same terms in a
     * different order, so they agree to round-off: 1e−10 of |P z|·max|a_ij|·|P y|.
     */
    @Test
    void shiftedRefreshGivesGalerkinProductOfShiftedMatrix() {
        HexMesh mesh = VoxelBreast.halfEllipsoid(40, 30, 35, 3, true);
        FeSystem sys = projectedTangent(mesh);
        int n = 3 * mesh.nodeCount();
        AggregationMultigrid mg = new AggregationMultigrid(mesh.xyzMm());
        mg.setup(sys.k);
        assertTrue(mg.levelCount() >= 3, "the test needs two coarse levels, has " + mg.levelCount());
        double meanDiag = 0;
        for (int r = 0; r < sys.k.rows; r++) {
            for (int i = 0; i < 3; i++) {
                meanDiag += sys.k.val[9 * sys.k.diag[r] + 4 * i];
            }
        }
        meanDiag /= n;
        Random rnd = new Random(5);
        double applied = 0;
        for (double tau : new double[] {0.1, 1e-3, 0}) {
            // as the solver does: shift the matrix the hierarchy was built for in place
            double sigma = tau * meanDiag;
            addDiagonal(sys.k, sigma - applied);
            applied = sigma;
            mg.refresh(sys.k, sigma);
            for (int li = 1; li < mg.levelCount(); li++) {
                BlockCsr ac = mg.operator(li);
                double[] y = TestMeshes.randomVector(rnd, ac.size());
                double[] z = TestMeshes.randomVector(rnd, ac.size());
                double[] acy = new double[ac.size()];
                ac.multiply(y, acy);
                double coarse = VecOps.dot(z, acy);
                double[] py = toFinest(mg, li, y, n);
                double[] pz = toFinest(mg, li, z, n);
                double[] apy = new double[n];
                sys.k.multiply(py, apy);
                double fine = VecOps.dot(pz, apy);
                double scale = VecOps.norm(pz) * VecOps.norm(py) * maxAbs(sys.k.val);
                assertEquals(fine, coarse, 1e-10 * scale, "level " + li + ", tau " + tau);
            }
        }
    }

    /**
     * Conjugate gradients with the multigrid's single-precision products still meet the tolerance in
     * the true, double-precision residual ‖b − A x‖ ≤ tol·‖b‖, down to the smallest tolerance that
     * uses them ({@link Pcg#SINGLE_MIN_TOL}).
     */
    @Test
    void singlePrecisionProductsMeetTheToleranceInDoublePrecision() {
        HexMesh mesh = VoxelBreast.halfEllipsoid(24, 18, 20, 3, true);
        FeSystem sys = projectedTangent(mesh);
        int n = 3 * mesh.nodeCount();
        Projector proj = new Projector(VoxelBreast.fixedChestWall(mesh));
        AggregationMultigrid mg = new AggregationMultigrid(mesh.xyzMm());
        mg.setup(sys.k);
        assertTrue(mg.singlePrecision(sys.k) != null, "the multigrid keeps a single-precision copy");
        double[] b = TestMeshes.randomVector(new Random(9), n);
        proj.project(b);
        double bn = VecOps.norm(b);
        for (double tol : new double[] {1e-4, Pcg.SINGLE_MIN_TOL}) {
            double[] x = new double[n];
            new Pcg().solve(sys.k, mg, b, x, tol, 5000);
            double[] ax = new double[n];
            sys.k.multiply(x, ax);
            double rn = 0;
            for (int i = 0; i < n; i++) {
                rn += (b[i] - ax[i]) * (b[i] - ax[i]);
            }
            assertTrue(Math.sqrt(rn) <= tol * bn, "true relative residual " + Math.sqrt(rn) / bn + " > " + tol);
        }
    }

    /** Tangent of the unloaded mesh with the chest wall fixed, projected as the solver does. */
    private static FeSystem projectedTangent(HexMesh mesh) {
        FeSystem sys = new FeSystem(mesh, MaterialTable.DEFAULTS, HexFormulation.MEAN_DILATATION);
        int n = 3 * mesh.nodeCount();
        sys.assemble(new double[n], new double[n], true, new double[1]);
        new Projector(VoxelBreast.fixedChestWall(mesh)).projectMatrix(sys.k);
        return sys;
    }

    private static void addDiagonal(BlockCsr a, double c) {
        for (int r = 0; r < a.rows; r++) {
            for (int i = 0; i < 3; i++) {
                a.val[9 * a.diag[r] + 4 * i] += c;
            }
        }
    }

    private static double[] toFinest(AggregationMultigrid mg, int li, double[] xc, int n) {
        double[] x = xc;
        for (int l = li - 1; l >= 0; l--) {
            double[] xf = new double[mg.operator(l).size()];
            mg.prolongateAdd(l, x, xf);
            x = xf;
        }
        assertEquals(n, x.length);
        return x;
    }

    private static double maxAbs(double[] v) {
        double m = 0;
        for (double x : v) {
            m = Math.max(m, Math.abs(x));
        }
        return m;
    }
}
