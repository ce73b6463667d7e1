package org.turnmark.mechanics.solve;

import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.HexMesh;

class BadInputTest {

    private static final MaterialTable MATS = MaterialTable.uniform(NeoHookeanMaterial.ofMuNu(1, 0.3, 1000));

    @Test
    void emptyMeshIsRejected() {
        HexMesh empty = new HexMesh(new double[0], new int[0], new int[0]);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new HyperelasticSolver(empty, MATS, new NodeConstraints(0), SolverConfig.defaults()));
        assertTrue(e.getMessage().contains("no elements"), e.getMessage());
    }

    @Test
    void floatingBodyIsRejected() {
        HexMesh mesh = TestMeshes.box(2, 2, 2, 10, 10, 10);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new HyperelasticSolver(mesh, MATS, new NodeConstraints(mesh.nodeCount()), SolverConfig.defaults()));
        assertTrue(e.getMessage().contains("floating"), e.getMessage());
    }

    /** Sliding on one flat plane leaves in-plane translation and spin free: still floating. */
    @Test
    void bodySlidingOnOneFlatPlaneIsRejected() {
        HexMesh mesh = TestMeshes.box(2, 2, 2, 10, 10, 10);
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        for (int n = 0; n < 9; n++) {
            bc.slide(n, 0, 0, 1);
        }
        assertThrows(IllegalArgumentException.class, () -> new HyperelasticSolver(mesh, MATS, bc, SolverConfig.defaults()));
    }

    @Test
    void disconnectedUnconstrainedPieceIsRejected() {
        HexMesh a = TestMeshes.box(1, 1, 1, 10, 10, 10);
        double[] x = new double[48];
        System.arraycopy(a.xyzMm(), 0, x, 0, 24);
        for (int i = 0; i < 24; i++) {
            x[24 + i] = a.xyzMm()[i] + (i % 3 == 0 ? 50 : 0);
        }
        int[] hex = new int[16];
        for (int i = 0; i < 8; i++) {
            hex[i] = a.hex()[i];
            hex[8 + i] = a.hex()[i] + 8;
        }
        HexMesh two = new HexMesh(x, hex, new int[] {1, 1});
        NodeConstraints bc = new NodeConstraints(16);
        for (int n = 0; n < 4; n++) {
            bc.fix(n);
        }
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new HyperelasticSolver(two, MATS, bc, SolverConfig.defaults()));
        assertTrue(e.getMessage().contains("disconnected"), e.getMessage());
    }

    @Test
    void unknownLabelIsRejected() {
        HexMesh mesh = new HexMesh(TestMeshes.box(1, 1, 1, 1, 1, 1).xyzMm(), TestMeshes.box(1, 1, 1, 1, 1, 1).hex(),
                new int[] {7});
        NodeConstraints bc = new NodeConstraints(8);
        for (int n = 0; n < 4; n++) {
            bc.fix(n);
        }
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new HyperelasticSolver(mesh, MaterialTable.DEFAULTS, bc, SolverConfig.defaults()));
        assertTrue(e.getMessage().contains("label 7"), e.getMessage());
    }

    /**
     * A load far beyond what the soft cube can carry in tension-free compression: the solver
     * must stop with the last residual and load fraction, never return a folded state.
     */
    @Test
    void nonConvergenceReportsResidualAndLoadFraction() {
        HexMesh mesh = TestMeshes.box(2, 2, 2, 10, 10, 10);
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        for (int n = 0; n < 9; n++) {
            bc.fix(n);
        }
        SolverConfig cfg = SolverConfig.defaults().withMaxNewtonIterations(3).withMinLoadIncrement(1.0 / 16);
        SolverDivergedException e = assertThrows(SolverDivergedException.class,
                () -> HyperelasticSolver.solve(mesh, MATS, bc, new double[] {0, 0, -1e5}, cfg, Progress.NONE, null));
        assertTrue(e.getMessage().contains("load fraction"), e.getMessage());
        assertTrue(e.loadFraction() >= 0 && e.loadFraction() < 1);
        assertTrue(Double.isFinite(e.lastResidualMn()));
    }

    @Test
    void badSolverSettingsAreRejected() {
        assertThrows(IllegalArgumentException.class, () -> SolverConfig.defaults().withLoadSteps(0));
        assertThrows(IllegalArgumentException.class, () -> SolverConfig.defaults().withTolerances(0, 1e-10));
        assertThrows(IllegalArgumentException.class, () -> new ReferenceStateConfig(-1, 10, 3));
        assertThrows(IllegalArgumentException.class, () -> new ReferenceStateConfig(0.5, 10, 3, 0.4));
        assertThrows(IllegalArgumentException.class, () -> new NodeConstraints(3).slide(0, 0, 0, 0));
    }

    @Test
    void cancellationStopsTheSolve() {
        HexMesh mesh = TestMeshes.box(2, 2, 2, 10, 10, 10);
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        for (int n = 0; n < 9; n++) {
            bc.fix(n);
        }
        Progress cancelled = new Progress() {
            @Override
            public void update(String stage, double fraction) {
            }

            @Override
            public boolean isCancelled() {
                return true;
            }
        };
        assertThrows(Progress.CancelledException.class,
                () -> HyperelasticSolver.solve(mesh, MATS, bc, new double[] {0, 0, -9.81}, SolverConfig.defaults(),
                        cancelled, null));
    }
}
