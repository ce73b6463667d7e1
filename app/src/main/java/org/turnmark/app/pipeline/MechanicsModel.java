package org.turnmark.app.pipeline;

import org.turnmark.app.uncertainty.PriorDesign;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.ChestWallBoundary;
import org.turnmark.mechanics.mesh.ConfigurationMap;
import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.mechanics.mesh.LabelMesh;
import org.turnmark.mechanics.mesh.LabelMesher;
import org.turnmark.mechanics.mesh.MeshSurface;
import org.turnmark.mechanics.mesh.MesherConfig;
import org.turnmark.mechanics.solve.ChestWallConstraints;
import org.turnmark.mechanics.solve.HyperelasticSolver;
import org.turnmark.mechanics.solve.NodeConstraints;
import org.turnmark.mechanics.solve.ReferenceStateConfig;
import org.turnmark.mechanics.solve.ReferenceStateResult;
import org.turnmark.mechanics.solve.ReferenceStateSolver;
import org.turnmark.mechanics.solve.SolveResult;
import org.turnmark.mechanics.solve.SolverConfig;

/**
 * The patient's finite-element model built from the prone labels, and the two solves of a plan:
 * the gravity-free reference state and the supine reload.
 *
 * <p>Reference state: the prone mesh x_p is the loaded shape; the unloaded nodes X solve
 * φ_prone(X) = x_p, found by the backward-displacement fixed point X ← X − (φ(X) − x_p) (Bols et al.,
 * ESAIM M2AN 47, 2013; REFERENCE §6) with each forward solve warm-started from the previous one, to
 * {@link #REFERENCE_TOLERANCE_MM}. Supine: the reference loaded by supine gravity (−y, optionally
 * tilted). The chest wall is the boundary in both (fixed or sliding on its local normal), so the
 * supine shape is expressed in the prone image frame with the chest wall held in place.
 *
 * <p>Not thread safe (one solve at a time).
 */
public final class MechanicsModel {

    /** Stop the reference iteration when no node is further than this from its prone position (mm): a third of a 1.5 mm voxel, a tenth of a 5 mm element. */
    public static final double REFERENCE_TOLERANCE_MM = 0.5;
    /** Bounds of the Aitken relaxation factor: keeps an extrapolated update from overshooting into inverted elements. */
    static final double MIN_RELAXATION = 0.3;
    static final double MAX_RELAXATION = 1.5;
    /** Halvings of a rejected reference update before giving up. */
    static final int MAX_BACKOFFS = 6;
    /** Fixed-point iterations before the reference state is declared not converged. */
    public static final int MAX_REFERENCE_ITERATIONS = 40;

    private final LabelMesh labelMesh;
    private final HexMesh proneMesh;
    private final ChestWallBoundary.ChestWall wall;
    private final double elementMm;
    private final SolverConfig cfg = SolverConfig.defaults();

    /**
     * Gravity-free reference and its prone solve.
     *
     * @param referenceXyzMm node positions X (mm)
     * @param proneU         displacements of the prone solve from X (mm), φ(X) = X + proneU
     * @param iterations     fixed-point iterations
     * @param residualMm     final max |φ(X) − x_p| (mm)
     * @param lastSolve      diagnostics of the last prone solve
     * @param seconds        wall time
     */
    public record Reference(double[] referenceXyzMm, double[] proneU, int iterations, double residualMm,
                            SolveResult lastSolve, double seconds) {
    }

    /** Thrown when the reference iteration does not reach its tolerance. */
    public static final class ReferenceNotConvergedException extends RuntimeException {
        private static final long serialVersionUID = 1L;

        public ReferenceNotConvergedException(String message) {
            super(message);
        }
    }

    private final boolean[] rim;

    private MechanicsModel(LabelMesh labelMesh, ChestWallBoundary.ChestWall wall, double elementMm, boolean[] rim) {
        this.rim = rim;
        this.labelMesh = labelMesh;
        this.proneMesh = labelMesh.mesh();
        this.wall = wall;
        this.elementMm = elementMm;
    }

    /**
     * Meshes the labels and finds the chest-wall boundary.
     *
     * @param grid      label grid
     * @param labels    labels per voxel (0 air, 1 fat, 2 gland, 3 skin, 4 chest wall, 5 lesion)
     * @param elementMm element edge (mm)
     */
    public static MechanicsModel build(Grid3 grid, byte[] labels, double elementMm) {
        LabelMesh lm = LabelMesher.mesh(grid, labels, MesherConfig.of(elementMm));
        MeshSurface surface = MeshSurface.of(lm.mesh());
        ChestWallBoundary.ChestWall wall = ChestWallBoundary.find(lm.mesh(), surface, grid, labels, elementMm);
        // Rim: chest-wall nodes that also lie on a skin face (the edge of the breast base).
        boolean[] rim = wall.rim(surface, lm.mesh().nodeCount());
        return new MechanicsModel(lm, wall, elementMm, rim);
    }

    public LabelMesh labelMesh() {
        return labelMesh;
    }

    /** The mesh in the prone (imaged) configuration. */
    public HexMesh proneMesh() {
        return proneMesh;
    }

    public ChestWallBoundary.ChestWall chestWall() {
        return wall;
    }

    public double elementMm() {
        return elementMm;
    }

    /**
     * Chest-wall nodes fixed, or sliding on their normals. When sliding, the rim of the contact (chest-wall
     * nodes that also lie on the skin, where the breast base meets the torso skin) and nodes without a
     * normal stay fixed: this anchors the base as the surrounding skin does and removes the rigid slide
     * and spin a flat or rotationally symmetric chest wall would otherwise leave free.
     */
    public NodeConstraints constraints(boolean sliding) {
        return ChestWallConstraints.of(proneMesh.nodeCount(), wall, rim, sliding);
    }

    /** The material table of a prior sample, with the densities of the case. */
    public static MaterialTable materials(PriorDesign.Sample s, double[] densityKgM3) {
        int[] labels = {MaterialTable.FAT, MaterialTable.FIBROGLANDULAR, MaterialTable.SKIN, MaterialTable.LESION};
        MaterialTable m = MaterialTable.empty();
        for (int t = 0; t < 4; t++) {
            m = m.with(labels[t], NeoHookeanMaterial.ofMuNu(s.muKpa()[t], s.nu(), densityKgM3[t]));
        }
        return m;
    }

    /** Prone gravity: +y (anterior) in RAS, magnitude g (REFERENCE §2). */
    public static double[] proneGravity(double g) {
        return new double[] {0, g, 0};
    }

    /**
     * Supine gravity −y turned by a roll about the superior axis (z) and a pitch about the right
     * axis (x), degrees.
     */
    public static double[] supineGravity(double g, double rollDeg, double pitchDeg) {
        Affine3D r = Affine3D.rotation(1, 0, 0, Math.toRadians(pitchDeg))
                .compose(Affine3D.rotation(0, 0, 1, Math.toRadians(rollDeg)));
        double[] v = {0, -g, 0};
        r.applyVector(v, v);
        return v;
    }

    /**
     * Solves for the gravity-free reference state.
     *
     * @param mats     materials
     * @param bc       constraints
     * @param gProne   prone gravity (m/s², RAS)
     * @param startX   initial guess of the reference nodes (null: the prone nodes)
     * @param startU   warm start of the prone displacement (null: none)
     * @param progress progress for this stage
     * @throws ReferenceNotConvergedException if the tolerance is not reached
     */
    public Reference reference(MaterialTable mats, NodeConstraints bc, double[] gProne, double[] startX, double[] startU,
                               Progress progress) {
        long t0 = System.nanoTime();
        double[] xp = proneMesh.xyzMm();
        double[] x = startX == null ? xp.clone() : startX.clone();
        double[] u = startU == null ? null : startU.clone();
        double res = Double.POSITIVE_INFINITY;
        SolveResult last = null;
        double[] r = new double[x.length];
        double[] rPrev = null;
        double omega = 1.0;
        double[] xPrev = null;
        int backoffs = 0;
        for (int it = 1; it <= MAX_REFERENCE_ITERATIONS; it++) {
            progress.checkCancelled();
            HexMesh ref = proneMesh.withNodes(x);
            try {
                last = new HyperelasticSolver(ref, mats, bc, cfg).solve(gProne, Progress.NONE, u);
            } catch (RuntimeException e) {
                // An update that inverts a reference element (or a load the solver cannot carry) is
                // rejected: go back to the last accepted X and take half the step.
                if (e instanceof Progress.CancelledException || xPrev == null || ++backoffs > MAX_BACKOFFS) {
                    throw e;
                }
                omega *= 0.5;
                for (int i = 0; i < x.length; i++) {
                    x[i] = xPrev[i] - omega * rPrev[i];
                }
                continue;
            }
            u = last.u();
            // Residual r = φ(X) − x_p.
            res = 0;
            for (int i = 0; i < x.length; i += 3) {
                r[i] = x[i] + u[i] - xp[i];
                r[i + 1] = x[i + 1] + u[i + 1] - xp[i + 1];
                r[i + 2] = x[i + 2] + u[i + 2] - xp[i + 2];
                res = Math.max(res, Math.sqrt(r[i] * r[i] + r[i + 1] * r[i + 1] + r[i + 2] * r[i + 2]));
            }
            progress.update("reference state", Math.min(1, it / 10.0));
            if (res <= REFERENCE_TOLERANCE_MM) {
                // φ(X) of the solve above is within res of x_p; report X = x_p − u so the prone nodes are exact.
                x = subtract(xp, u);
                return new Reference(x, u, it, res, last, (System.nanoTime() - t0) / 1e9);
            }
            // Aitken's dynamic relaxation of the backward-displacement update X ← X − ω r (Irons & Tuck,
            // IJNME 1, 1969; Küttler & Wall, Comput Mech 43, 2008, eq. 44): ω_k = −ω_{k−1} r_{k−1}·Δr / |Δr|².
            if (rPrev != null) {
                double num = 0;
                double den = 0;
                for (int i = 0; i < r.length; i++) {
                    double d = r[i] - rPrev[i];
                    num += rPrev[i] * d;
                    den += d * d;
                }
                if (den > 0) {
                    omega = Math.max(MIN_RELAXATION, Math.min(MAX_RELAXATION, -omega * num / den));
                }
            } else {
                rPrev = new double[r.length];
            }
            xPrev = x.clone();
            for (int i = 0; i < x.length; i++) {
                x[i] -= omega * r[i];
            }
            System.arraycopy(r, 0, rPrev, 0, r.length);
        }
        throw new ReferenceNotConvergedException(String.format(java.util.Locale.ROOT,
                "reference state did not converge in %d iterations: a node is still %.2f mm from its prone position "
                        + "(tolerance %.2f mm)", MAX_REFERENCE_ITERATIONS, res, REFERENCE_TOLERANCE_MM));
    }

    /** Anderson depth for the cold-start reference state (the mechanics module's default). */
    static final int ANDERSON_DEPTH = 5;

    /**
     * The nominal (cold-start) reference state: the mechanics module's Anderson-accelerated
     * fixed point ({@link ReferenceStateSolver}) to {@link #REFERENCE_TOLERANCE_MM}, then one
     * warm-started pass of {@link #reference} for the solve diagnostics reported with the plan.
     */
    public Reference referenceFromProne(MaterialTable mats, NodeConstraints bc, double[] gProne, Progress progress) {
        long t0 = System.nanoTime();
        ReferenceStateResult rs = ReferenceStateSolver.solve(proneMesh, mats, bc, gProne, cfg,
                new ReferenceStateConfig(REFERENCE_TOLERANCE_MM, MAX_REFERENCE_ITERATIONS, ANDERSON_DEPTH), progress);
        Reference r = reference(mats, bc, gProne, rs.reference().xyzMm(), rs.uToLoaded(), progress);
        return new Reference(r.referenceXyzMm(), r.proneU(), rs.iterations() + r.iterations(), r.residualMm(),
                r.lastSolve(), (System.nanoTime() - t0) / 1e9);
    }

    private static double[] subtract(double[] a, double[] b) {
        double[] out = new double[a.length];
        for (int i = 0; i < a.length; i++) {
            out[i] = a[i] - b[i];
        }
        return out;
    }

    /**
     * Loads the reference by supine gravity.
     *
     * @param warmU warm start (null: none)
     */
    public SolveResult supine(MaterialTable mats, NodeConstraints bc, Reference ref, double[] gSupine, double[] warmU) {
        HexMesh m = proneMesh.withNodes(ref.referenceXyzMm());
        return new HyperelasticSolver(m, mats, bc, cfg).solve(gSupine, Progress.NONE, warmU);
    }

    /** Prone node positions of the solved model: X + u_prone. */
    public static double[] proneNodes(Reference ref) {
        double[] x = ref.referenceXyzMm();
        double[] u = ref.proneU();
        double[] out = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            out[i] = x[i] + u[i];
        }
        return out;
    }

    /** Supine node positions X + u_supine. */
    public static double[] supineNodes(Reference ref, SolveResult supine) {
        double[] x = ref.referenceXyzMm();
        double[] u = supine.u();
        double[] out = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            out[i] = x[i] + u[i];
        }
        return out;
    }

    /** The prone → supine point map (prone image frame, chest wall in place). */
    public ConfigurationMap proneToSupine(Reference ref, SolveResult supine) {
        return new ConfigurationMap(proneMesh, proneNodes(ref), supineNodes(ref, supine));
    }
}
