package org.turnmark.app.pipeline;

import java.util.Locale;

import org.turnmark.app.uncertainty.PriorDesign;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.ChestWallBoundary;
import org.turnmark.mechanics.mesh.ConfigurationMap;
import org.turnmark.mechanics.mesh.FieldOfViewEdge;
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
import org.turnmark.mechanics.solve.SolverDivergedException;
import org.turnmark.mechanics.solve.SolverConfig;

/**
 * The patient's finite-element model built from the prone labels, and the two solves of a plan:
 * the gravity-free reference state and the supine reload.
 *
 * <p>Reference state: the prone mesh x_p is the loaded shape; the unloaded nodes X solve
 * φ_prone(X) = x_p, found by the backward-displacement fixed point X ← X − (φ(X) − x_p) (Bols et al.,
 * ESAIM M2AN 47, 2013; REFERENCE §6) with Anderson acceleration and each forward solve warm-started
 * from the previous one, to {@link #REFERENCE_TOLERANCE_MM}. Supine: the reference loaded by supine gravity (−y, optionally
 * tilted). The chest wall is the boundary in both (fixed or sliding on its local normal), so the
 * supine shape is expressed in the prone image frame with the chest wall held in place.
 *
 * <p>Not thread safe (one solve at a time).
 */
public final class MechanicsModel {

    /** Stop the reference iteration when no node is further than this from its prone position (mm): a third of a 1.5 mm voxel, a tenth of a 5 mm element. */
    public static final double REFERENCE_TOLERANCE_MM = 0.5;
    /**
     * Largest nodal mismatch accepted when 99 % of the nodes meet {@link #REFERENCE_TOLERANCE_MM}
     * (mm). On the bundled phantoms the last few nodes to converge sit in strongly distorted
     * elements at the edge of the chest-wall contact; by the time fewer than 1 % exceed the
     * tolerance the RMS mismatch is ≈ 0.1 mm and the lesion region has long converged, while the
     * strict rule would cost up to twice the forward solves for those few nodes.
     */
    public static final double REFERENCE_MAX_MISMATCH_MM = 2.0;
    /**
     * Forward solves allowed to a warm-started reference state (a prior sample started from the
     * nominal solution). On the bundled phantom the samples that converge do so in 2–18 solves; one
     * that has not converged by then has stalled (its mismatch stays at 1–3 mm), and letting it run to
     * {@link #MAX_REFERENCE_ITERATIONS} cost up to 4 minutes for nothing. Such a sample is left out and
     * counted in the plan's quality flags.
     */
    public static final int MAX_WARM_REFERENCE_ITERATIONS = 20;
    /**
     * A warm-started sample whose best RMS mismatch has not fallen by 10 % in this many forward
     * solves has stalled and is left out at once (its remaining solves would be wasted: on the
     * bundled phantom such a sample used 20 solves and 3 minutes, then failed anyway).
     */
    public static final int SAMPLE_STALL_WINDOW = 6;
    /**
     * Tolerance of a prior sample's reference state (mm; 99 % of the nodes). A sample contributes
     * the spread of the predicted lesion position, several mm per axis on the bundled phantoms; a
     * reference error of ≤ 1 mm at 99 % of the nodes (the lesion lies inside, where the mismatch
     * is far below its maximum at the chest-wall rim) adds at most 1 mm² to a variance of ≳ 4 mm².
     * The nominal solution keeps {@link #REFERENCE_TOLERANCE_MM}. In the log of a phantom-small run
     * with 0.5 mm for samples, the samples that needed up to 18 forward solves (or stalled after 20)
     * were within 1 mm / 3 mm after 4–12; a re-run of 14 calibration lesions with 0.5 mm gave the
     * same coverage (docs/benchmarks.md).
     */
    public static final double SAMPLE_TOLERANCE_MM = 1.0;
    /** Largest nodal mismatch of a prior sample's reference state (mm), as {@link #REFERENCE_MAX_MISMATCH_MM}. */
    public static final double SAMPLE_MAX_MISMATCH_MM = 3.0;
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
     * @param heldNodes      nodes held back so that no element of the reference collapses (their
     *                       mismatch may exceed {@link #REFERENCE_MAX_MISMATCH_MM}); 0 when none
     */
    public record Reference(double[] referenceXyzMm, double[] proneU, int iterations, double residualMm,
                            SolveResult lastSolve, double seconds, int heldNodes, double withinPercent,
                            boolean fallback) {
    }

    /** Thrown when the reference iteration does not reach its tolerance. */
    public static final class ReferenceNotConvergedException extends RuntimeException {
        private static final long serialVersionUID = 1L;

        public ReferenceNotConvergedException(String message) {
            super(message);
        }
    }

    private final boolean[] rim;
    /** Nodes where the image's field of view cuts the tissue: held in place ({@link FieldOfViewEdge}). */
    private final boolean[] cut;

    private MechanicsModel(LabelMesh labelMesh, ChestWallBoundary.ChestWall wall, double elementMm, boolean[] rim,
                           boolean[] cut) {
        this.rim = rim;
        this.cut = cut;
        this.labelMesh = labelMesh;
        this.proneMesh = labelMesh.mesh();
        this.wall = wall;
        this.elementMm = elementMm;
    }

    /**
     * Tissue pieces not connected to the largest one may hold up to this fraction of the elements and are
     * then dropped with a warning (the mesher's own default is 1 %). A piece that shares no node with the
     * largest one never interacts with it in the model, so dropping it leaves the modelled breast's
     * mechanics unchanged; it only stops points inside it from being mapped, which
     * {@link Planner} checks for every lesion ({@link #requireModelled}). Such pieces are typically strips of
     * thin torso fat at the border of the image that a coarse element lattice cuts off (about 5 % of the
     * elements at 8 mm on the priors-drawn phantoms, docs/benchmarks.md).
     */
    static final double MAX_DROPPED_FRACTION = 0.25;

    /**
     * Checks that a point lies in the modelled tissue: some mesh node within one element edge. A lesion
     * outside would otherwise be carried by the nearest node of a piece it does not belong to.
     *
     * @throws PlanInputException naming the point, its distance and the likely cause
     */
    void requireModelled(String what, double[] xRasMm) {
        double[] p = labelMesh.mesh().xyzMm();
        int n = nearestNode(p, xRasMm);
        double best = Math.sqrt(squared(p, n, xRasMm));
        if (best > elementMm) {
            throw new PlanInputException(String.format(Locale.ROOT, "%s at (%.1f, %.1f, %.1f) mm is %.1f mm from the "
                    + "modelled tissue (more than one %.3g mm element): it lies in tissue the model does not hold, "
                    + "most likely a piece not connected to the largest one and dropped (see the warnings); use "
                    + "smaller elements or check the labels", what, xRasMm[0], xRasMm[1], xRasMm[2], best, elementMm,
                    elementMm));
        }
    }

    /** Index of the node (3 coordinates per node, mm) nearest to {@code x}; the first of equals. */
    static int nearestNode(double[] nodesMm, double[] x) {
        int best = 0;
        double bd = Double.POSITIVE_INFINITY;
        for (int n = 0; n < nodesMm.length / 3; n++) {
            double d = squared(nodesMm, n, x);
            if (d < bd) {
                bd = d;
                best = n;
            }
        }
        return best;
    }

    private static double squared(double[] nodesMm, int n, double[] x) {
        double dx = nodesMm[3 * n] - x[0];
        double dy = nodesMm[3 * n + 1] - x[1];
        double dz = nodesMm[3 * n + 2] - x[2];
        return dx * dx + dy * dy + dz * dz;
    }

    /**
     * Meshes the labels and finds the chest-wall boundary.
     *
     * @param grid      label grid
     * @param labels    labels per voxel (0 air, 1 fat, 2 gland, 3 skin, 4 chest wall, 5 lesion)
     * @param elementMm element edge (mm)
     */
    public static MechanicsModel build(Grid3 grid, byte[] labels, double elementMm) {
        LabelMesh lm = LabelMesher.mesh(grid, labels, new MesherConfig(elementMm, MesherConfig.DEFAULT_TISSUE_FRACTION,
                MesherConfig.DEFAULT_LESION_FRACTION, MAX_DROPPED_FRACTION, MesherConfig.DEFAULT_MAX_ELEMENTS));
        MeshSurface surface = MeshSurface.of(lm.mesh());
        ChestWallBoundary.ChestWall wall = ChestWallBoundary.find(lm.mesh(), surface, grid, labels, elementMm);
        // Rim: chest-wall nodes that also lie on a skin face (the edge of the breast base).
        boolean[] rim = wall.rim(surface, lm.mesh().nodeCount());
        return new MechanicsModel(lm, wall, elementMm, rim, FieldOfViewEdge.cutNodes(lm.mesh(), grid));
    }

    public LabelMesh labelMesh() {
        return labelMesh;
    }

    /** The mesh in the prone (imaged) configuration. */
    public HexMesh proneMesh() {
        return proneMesh;
    }

    /** Number of nodes held in place where the image's field of view cuts the tissue. */
    public int fieldOfViewNodes() {
        return FieldOfViewEdge.count(cut);
    }

    /**
     * Nodes on the field-of-view cut further than {@link #BREAST_CUT_MM} plus one element from the
     * chest-wall contact count as a cut through the breast itself. A cut through the torso's skin and fat
     * beside the breast lies within their thickness of the chest wall (12 mm on the phantoms); the breast
     * stands 40 mm or more in front of it. The added element allows for both ends of the distance being
     * lattice nodes. A stated heuristic, used only to word a warning.
     */
    public static final double BREAST_CUT_MM = 20;

    /**
     * Where the field of view cuts the breast itself rather than the torso around it.
     *
     * @param nodes         cut nodes further than {@link #BREAST_CUT_MM} + one element from the chest wall
     * @param maxDistanceMm largest distance of a cut node from the chest-wall contact (mm); 0 with no cut
     */
    public record BreastCut(int nodes, double maxDistanceMm) {
    }

    /** How far from the chest wall the field of view cuts the tissue ({@link #BREAST_CUT_MM}). */
    public BreastCut breastCut() {
        double[] d = FieldOfViewEdge.distanceFromWallMm(proneMesh, cut, wall.nodes());
        int n = 0;
        double max = 0;
        for (double v : d) {
            if (!Double.isNaN(v)) {
                max = Math.max(max, v);
                n += v > BREAST_CUT_MM + elementMm ? 1 : 0;
            }
        }
        return new BreastCut(n, max);
    }

    /**
     * The warning for a cut through the breast itself, or null when the cut (if any) stays in the torso
     * wall.
     */
    public String breastCutWarning() {
        BreastCut c = breastCut();
        if (c.nodes() == 0) {
            return null;
        }
        return String.format(Locale.ROOT, "the image's field of view cuts the breast itself: %d mesh nodes on the "
                + "image edge lie up to %.0f mm from the chest wall (more than %.0f mm + one %.3g mm element). The "
                + "model holds them in place as if the body went on beyond the image, which the breast does not: "
                + "predictions near that edge are less reliable than the ellipsoids say. Use an image whose field "
                + "of view holds the whole breast", c.nodes(), c.maxDistanceMm(), BREAST_CUT_MM, elementMm);
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
     * and spin a flat or rotationally symmetric chest wall would otherwise leave free. Nodes where the
     * image's field of view cuts the tissue are fixed too ({@link FieldOfViewEdge}).
     */
    public NodeConstraints constraints(boolean sliding) {
        NodeConstraints bc = ChestWallConstraints.of(proneMesh.nodeCount(), wall, rim, sliding);
        for (int n = 0; n < cut.length; n++) {
            if (cut[n]) {
                bc.fix(n);
            }
        }
        return bc;
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
     * Solves for the gravity-free reference state with the mechanics module's Anderson-accelerated
     * backward-displacement fixed point ({@link ReferenceStateSolver}) to
     * {@link #REFERENCE_TOLERANCE_MM}, optionally warm-started from a nearby solution (the nominal
     * reference when sampling the priors).
     *
     * @param mats     materials
     * @param bc       constraints
     * @param gProne   prone gravity (m/s², RAS)
     * @param startX   initial guess of the reference nodes (null: the prone nodes); a warm start
     *                 (a prior sample) gets at most {@link #MAX_WARM_REFERENCE_ITERATIONS} forward
     *                 solves and the sample tolerances {@link #SAMPLE_TOLERANCE_MM},
     *                 {@link #SAMPLE_MAX_MISMATCH_MM}
     * @param startU   warm start of the prone displacement from {@code startX} (null: none)
     * @param progress progress for this stage
     * @throws ReferenceNotConvergedException if the tolerance is not reached
     */
    public Reference reference(MaterialTable mats, NodeConstraints bc, double[] gProne, double[] startX, double[] startU,
                               Progress progress) {
        long t0 = System.nanoTime();
        ReferenceStateResult rs;
        boolean sample = startX != null;
        double tol = sample ? SAMPLE_TOLERANCE_MM : REFERENCE_TOLERANCE_MM;
        try {
            rs = ReferenceStateSolver.solve(proneMesh, mats, bc, gProne, cfg,
                    new ReferenceStateConfig(tol, sample ? MAX_WARM_REFERENCE_ITERATIONS : MAX_REFERENCE_ITERATIONS,
                            ANDERSON_DEPTH, sample ? SAMPLE_MAX_MISMATCH_MM : REFERENCE_MAX_MISMATCH_MM,
                            sample ? SAMPLE_STALL_WINDOW : 0, !sample), progress, startX, startU);
        } catch (SolverDivergedException e) {
            throw new ReferenceNotConvergedException("reference state: " + e.getMessage());
        }
        // When every node of φ(X) is within the tolerance of x_p, report X = x_p − u so the prone
        // nodes are reproduced exactly by X + u. When a few lag further (up to the bound), moving
        // their reference nodes by that much could distort their (already strongly deformed)
        // elements: keep the solved X, whose prone nodes X + u differ from x_p by the mismatch.
        double[] u = rs.uToLoaded();
        double[] x = rs.maxMismatchMm() <= tol ? subtract(proneMesh.xyzMm(), u)
                : rs.reference().xyzMm();
        return new Reference(x, u, rs.iterations(), rs.maxMismatchMm(), rs.lastSolve(),
                (System.nanoTime() - t0) / 1e9, rs.heldNodes(), rs.withinPercent(), rs.fallback());
    }

    /** Anderson depth of the reference iteration (the mechanics module's default). */
    static final int ANDERSON_DEPTH = 5;

    /** The nominal (cold-start) reference state: {@link #reference} from the prone nodes. */
    public Reference referenceFromProne(MaterialTable mats, NodeConstraints bc, double[] gProne, Progress progress) {
        return reference(mats, bc, gProne, null, null, progress);
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
