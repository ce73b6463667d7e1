package org.turnmark.app.cli;

import org.turnmark.geom.Progress;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.mechanics.solve.HyperelasticSolver;
import org.turnmark.mechanics.solve.NodeConstraints;
import org.turnmark.mechanics.solve.ReferenceStateConfig;
import org.turnmark.mechanics.solve.ReferenceStateResult;
import org.turnmark.mechanics.solve.ReferenceStateSolver;
import org.turnmark.mechanics.solve.SolveResult;
import org.turnmark.mechanics.solve.SolverConfig;

/**
 * The solves of one {@code simulate} run and the two node configurations they connect.
 *
 * @param fromXyz   node positions in the input image's configuration (the mesh as built), mm
 * @param toXyz     node positions in the output configuration (loaded, or the target posture), mm
 * @param stateMesh the mesh in the unloaded configuration the target solve started from (the image
 *                  geometry in forward mode, the estimated reference in reload mode)
 * @param stateU    displacement of the target solve from {@code stateMesh}, mm, 3 per node
 * @param target    diagnostics of the target solve
 * @param reference the reference-state estimate (reload mode), or null
 */
record SimulateRun(double[] fromXyz, double[] toXyz, HexMesh stateMesh, double[] stateU, SolveResult target,
                   ReferenceStateResult reference) {

    /** Forward mode: the image geometry is the unloaded state. */
    static SimulateRun forward(HexMesh mesh, MaterialTable mats, NodeConstraints bc, double[] g, SolverConfig cfg,
                               Progress progress) {
        SolveResult r = HyperelasticSolver.solve(mesh, mats, bc, g, cfg, progress.sub("gravity solve", 0, 1), null);
        return new SimulateRun(mesh.xyzMm(), add(mesh.xyzMm(), r.u()), mesh, r.u(), r, null);
    }

    /**
     * Reload mode: reference state from the image (loaded by {@code gFrom}), then the reference loaded
     * by {@code gTo}, warm-started from nothing (the two loads differ in direction).
     */
    static SimulateRun reload(HexMesh mesh, MaterialTable mats, NodeConstraints bc, double[] gFrom, double[] gTo,
                              SolverConfig cfg, Progress progress) {
        ReferenceStateResult ref = ReferenceStateSolver.solve(mesh, mats, bc, gFrom, cfg,
                ReferenceStateConfig.defaults(), progress.sub("reference state", 0, 1));
        HexMesh x0 = ref.reference();
        SolveResult r = HyperelasticSolver.solve(x0, mats, bc, gTo, cfg, progress.sub("reload", 0, 1), null);
        return new SimulateRun(mesh.xyzMm(), add(x0.xyzMm(), r.u()), x0, r.u(), r, ref);
    }

    static double[] add(double[] a, double[] b) {
        double[] out = new double[a.length];
        for (int i = 0; i < a.length; i++) {
            out[i] = a[i] + b[i];
        }
        return out;
    }
}
