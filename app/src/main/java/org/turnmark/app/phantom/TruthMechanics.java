package org.turnmark.app.phantom;

import java.util.SplittableRandom;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
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
import org.turnmark.mechanics.mesh.PointMap;
import org.turnmark.mechanics.solve.HyperelasticSolver;
import org.turnmark.mechanics.solve.NodeConstraints;
import org.turnmark.mechanics.solve.SolveResult;
import org.turnmark.mechanics.solve.SolverConfig;

/**
 * The truth postures of a phantom: the reference anatomy is meshed and loaded by gravity twice with
 * the project's neo-Hookean solver, prone (g along +y) and supine (g along −y, turned by the torso
 * rotation), under truth conditions that differ on purpose from the planner's defaults:
 * <ul>
 *   <li>per-tissue shear moduli drawn log-normally about the defaults ({@link #STIFFNESS_GSD}, draws
 *       truncated at ±{@link #MAX_Z} standard deviations);</li>
 *   <li>Poisson's ratio {@link #TRUTH_NU} for every tissue (default 0.49);</li>
 *   <li>densities of fat and gland scaled by a common factor drawn uniformly in ±3 %;</li>
 *   <li>sliding chest wall (normal displacement zero, tangential free);</li>
 *   <li>supine only: the torso turned by 2°–4° (random sign) about the body axis (z) through the
 *       torso centre, and shifted on the table by up to ±4 mm in x and z and ±2 mm in y; gravity in
 *       the body frame turns with it.</li>
 * </ul>
 * Element size {@link PhantomOptions#elementMm()}; elements are tissue when at least
 * {@link #TISSUE_FRACTION} of their sub-samples are tissue (a generous rule so the mesh covers the
 * anatomy; the truth map extends the displacement to the few tissue points outside the mesh).
 */
public final class TruthMechanics {

    /** Poisson's ratio of the truth model (the planner's default is 0.49). */
    public static final double TRUTH_NU = 0.47;
    /** Geometric standard deviation of the per-tissue shear moduli (the planner's prior for fat and gland). */
    public static final double STIFFNESS_GSD = 1.6;
    /** Draws are truncated at this many standard deviations, keeping the truth solvable. */
    public static final double MAX_Z = 1.5;
    /** Mesher tissue fraction for the truth mesh. */
    public static final double TISSUE_FRACTION = 0.3;
    /** Standard gravity, m/s² (CGPM 1901). */
    public static final double G = 9.80665;

    /** Truth conditions and solver diagnostics, for the sidecar files. */
    public record Conditions(double[] muKpa, double nu, double densityScale, double torsoRotationDeg,
                             double[] tableShiftMm, double[] supineGravityMs2, int elements, int nodes,
                             int chestWallNodes, SolveResult prone, SolveResult supine) {
    }

    private final TruthPosture prone;
    private final TruthPosture supine;
    private final Conditions conditions;

    private TruthMechanics(TruthPosture prone, TruthPosture supine, Conditions conditions) {
        this.prone = prone;
        this.supine = supine;
        this.conditions = conditions;
    }

    public TruthPosture prone() {
        return prone;
    }

    public TruthPosture supine() {
        return supine;
    }

    public Conditions conditions() {
        return conditions;
    }

    /**
     * Meshes and solves both postures.
     *
     * @param anatomy       the reference anatomy
     * @param referenceLabels its labels on {@code anatomy.grid()}
     * @param progress      progress ("truth mechanics")
     */
    public static TruthMechanics solve(PhantomAnatomy anatomy, byte[] referenceLabels, Progress progress) {
        PhantomOptions o = anatomy.options();
        Grid3 grid = anatomy.grid();
        SplittableRandom rng = new SplittableRandom(MrRenderer.mix(o.seed(), 77));
        progress.update("truth mesh", 0);
        MesherConfig mc = new MesherConfig(o.elementMm(), TISSUE_FRACTION, MesherConfig.DEFAULT_LESION_FRACTION,
                0.05, MesherConfig.DEFAULT_MAX_ELEMENTS);
        LabelMesh lm = LabelMesher.mesh(grid, referenceLabels, mc);
        HexMesh mesh = lm.mesh();
        MeshSurface surface = MeshSurface.of(mesh);
        ChestWallBoundary.ChestWall wall = ChestWallBoundary.find(mesh, surface, grid, referenceLabels, o.elementMm());
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        int[] wn = wall.nodes();
        double[] normals = wall.normals();
        for (int i = 0; i < wn.length; i++) {
            double nx = normals[3 * i];
            double ny = normals[3 * i + 1];
            double nz = normals[3 * i + 2];
            if (nx == 0 && ny == 0 && nz == 0) {
                bc.fix(wn[i]);
            } else {
                bc.slide(wn[i], nx, ny, nz);
            }
        }
        // Truth materials: log-normal per tissue about the defaults, another ν, scaled densities.
        int[] labels = {MaterialTable.FAT, MaterialTable.FIBROGLANDULAR, MaterialTable.SKIN, MaterialTable.LESION};
        double densityScale = 0.97 + 0.06 * rng.nextDouble();
        MaterialTable mats = MaterialTable.empty();
        double[] mu = new double[6];
        for (int l : labels) {
            NeoHookeanMaterial d = MaterialTable.DEFAULTS.get(l);
            double z = Math.max(-MAX_Z, Math.min(MAX_Z, gaussian(rng)));
            mu[l] = d.muKpa() * StrictMath.exp(z * StrictMath.log(STIFFNESS_GSD));
            double rho = (l == MaterialTable.FAT || l == MaterialTable.FIBROGLANDULAR)
                    ? d.densityKgM3() * densityScale : d.densityKgM3();
            mats = mats.with(l, NeoHookeanMaterial.ofMuNu(mu[l], TRUTH_NU, rho));
        }
        double sign = rng.nextDouble() < 0.5 ? -1 : 1;
        double rotDeg = sign * (2 + 2 * rng.nextDouble());
        double[] shift = {8 * rng.nextDouble() - 4, 4 * rng.nextDouble() - 2, 8 * rng.nextDouble() - 4};
        Affine3D rot = Affine3D.translation(0, PhantomAnatomy.TORSO_CY_MM, 0)
                .compose(Affine3D.rotation(0, 0, 1, Math.toRadians(rotDeg)))
                .compose(Affine3D.translation(0, -PhantomAnatomy.TORSO_CY_MM, 0));
        Affine3D supinePlacement = Affine3D.translation(shift[0], shift[1], shift[2]).compose(rot);
        // Gravity is −y in the supine image frame; in the body (chest-wall) frame it is R⁻¹(0, −g, 0).
        double[] gSupine = {0, -G, 0};
        rot.inverse().applyVector(gSupine, gSupine);
        SolverConfig cfg = SolverConfig.defaults();
        progress.update("truth prone solve", 0);
        SolveResult rp = HyperelasticSolver.solve(mesh, mats, bc, new double[] {0, G, 0}, cfg,
                progress.sub("truth prone solve", 0, 1), null);
        progress.update("truth supine solve", 0);
        SolveResult rs = HyperelasticSolver.solve(mesh, mats, bc, gSupine, cfg,
                progress.sub("truth supine solve", 0, 1), null);
        TruthPosture prone = dense(anatomy, mesh, rp.u(), Affine3D.identity());
        TruthPosture supine = dense(anatomy, mesh, rs.u(), supinePlacement);
        Conditions c = new Conditions(mu, TRUTH_NU, densityScale, rotDeg, shift, gSupine, mesh.elementCount(),
                mesh.nodeCount(), wn.length, rp, rs);
        return new TruthMechanics(prone, supine, c);
    }

    /** Samples the finite-element displacement at the image voxel centres and extends it outside the mesh. */
    private static TruthPosture dense(PhantomAnatomy anatomy, HexMesh mesh, double[] u, Affine3D placement) {
        Grid3 g = anatomy.grid();
        int n = g.size();
        float[] ux = new float[n];
        float[] uy = new float[n];
        float[] uz = new float[n];
        boolean[] known = new boolean[n];
        ConfigurationMap fwd = ConfigurationMap.forward(mesh, u);
        Parallel.forEachBlock(g.nz(), (long) n * 16, k -> {
            PointMap.Evaluator ev = fwd.evaluator();
            double[] q = new double[3];
            VoxelSampling.forEachInSlice(g, k, (v, p) -> {
                if (ev.map(p[0], p[1], p[2], q)) {
                    ux[v] = (float) (q[0] - p[0]);
                    uy[v] = (float) (q[1] - p[1]);
                    uz[v] = (float) (q[2] - p[2]);
                    known[v] = true;
                }
            });
        });
        TruthPosture.extend(g, ux, uy, uz, known);
        return new TruthPosture(anatomy, g, ux, uy, uz, placement);
    }

    private static double gaussian(SplittableRandom r) {
        double u1 = 1.0 - r.nextDouble();
        double u2 = r.nextDouble();
        return StrictMath.sqrt(-2 * StrictMath.log(u1)) * StrictMath.cos(2 * Math.PI * u2);
    }
}
