package org.turnmark.mechanics.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.HexMesh;

class CubeGravityTest {

    /**
     * A single cube resting on a fixed base sags under its own weight; for a small load the top
     * settlement approaches the confined-column value ρgH²/(2M) only loosely (the cube is not
     * laterally confined), so this test checks equilibrium and direction, not the value.
     */
    @Test
    void singleCubeUnderGravityConvergesAndSagsDownward() {
        HexMesh mesh = TestMeshes.box(1, 1, 1, 10, 10, 10);
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        for (int n = 0; n < 4; n++) {
            bc.fix(n);
        }
        MaterialTable mats = MaterialTable.uniform(NeoHookeanMaterial.ofMuNu(1.0, 0.3, 1000));
        SolveResult r = HyperelasticSolver.solve(mesh, mats, bc, new double[] {0, 0, -9.81},
                SolverConfig.defaults(), Progress.NONE, null);
        assertTrue(r.converged());
        for (int n = 4; n < 8; n++) {
            assertTrue(r.u()[3 * n + 2] < 0, "top node " + n + " must move down");
        }
        for (int n = 0; n < 4; n++) {
            assertEquals(0.0, r.u()[3 * n + 2], 0.0);
        }
        assertTrue(r.relativeResidual() <= SolverConfig.defaults().residualTolerance());
        assertTrue(r.minDetF() > 0);
    }
}
