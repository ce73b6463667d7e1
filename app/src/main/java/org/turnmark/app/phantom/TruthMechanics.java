package org.turnmark.app.phantom;

import java.util.Locale;
import java.util.SplittableRandom;

import org.turnmark.app.pipeline.DefaultPriors;
import org.turnmark.app.pipeline.MechanicsModel;
import org.turnmark.app.uncertainty.PriorDesign;
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
import org.turnmark.mechanics.solve.ChestWallConstraints;
import org.turnmark.mechanics.solve.HyperelasticSolver;
import org.turnmark.mechanics.solve.NodeConstraints;
import org.turnmark.mechanics.solve.SolveResult;
import org.turnmark.mechanics.solve.SolverConfig;
import org.turnmark.mechanics.solve.SolverDivergedException;

/**
 * The truth postures of a phantom: the reference anatomy is meshed and loaded by gravity twice with
 * the project's neo-Hookean solver, prone (g along +y) and supine (g along −y, turned by the torso
 * rotation), under truth conditions chosen by {@link PhantomOptions#truth()}.
 *
 * <p>{@link PhantomOptions.Truth#DEFAULT}: conditions that differ on purpose from the planner's defaults:
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
 *
 * <p>{@link PhantomOptions.Truth#PRIORS}: one draw ({@link #priorDraw}) from the planner's default
 * priors ({@link DefaultPriors#spec()}, {@link PriorDesign#draw}): per-tissue μ log-normal with the
 * planner's medians and geometric SDs, ν uniform on the planner's range (every tissue), the chest wall
 * sliding with the planner's probability else fixed, built by the planner's own rule
 * ({@link ChestWallConstraints}: when sliding, the rim of the contact stays fixed), the planner's
 * densities, and supine gravity in the body frame {@link MechanicsModel#supineGravity} turned by the
 * drawn roll and pitch. The torso placement (rotation about z and table shift, drawn as in the default
 * mode) is then a rigid nuisance of the supine image frame only, which the planner's rigid alignment
 * removes: gravity in the body frame does not turn with it.
 *
 * <p>Element size {@link PhantomOptions#elementMm()}; elements are tissue when at least
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

    /**
     * A truth drawn from the planner's priors that the solver cannot load (an extreme draw, e.g. a very
     * soft tissue): the message states the draw and the solver's failure. No truncation is applied to
     * the draws (the planner's prior has none), so such a seed is reported, not silently redrawn.
     */
    public static final class PriorDrawNotSolvedException extends RuntimeException {
        private static final long serialVersionUID = 1L;

        private final transient PriorDesign.Sample draw;

        PriorDrawNotSolvedException(PriorDesign.Sample draw, SolverDivergedException cause) {
            super("the truth drawn from the planner's priors (" + describe(draw) + ") could not be solved: "
                    + cause.getMessage(), cause);
            this.draw = draw;
        }

        /** The draw that could not be solved. */
        public PriorDesign.Sample draw() {
            return draw;
        }
    }

    /** Seed salt of the stream the {@link PhantomOptions.Truth#PRIORS} draw comes from. */
    static final long PRIOR_STREAM = 78;

    /**
     * Truth conditions and solver diagnostics, for the sidecar files.
     *
     * @param muKpa            shear modulus per label (index = label; 1, 2, 3, 5 used), kPa
     * @param nu               Poisson's ratio of every tissue
     * @param densityScale     factor on the fat and gland densities (default mode; 1 with priors)
     * @param torsoRotationDeg supine torso rotation about z (degrees)
     * @param tableShiftMm     supine table shift (mm)
     * @param supineGravityMs2 supine gravity in the body (chest-wall) frame (m/s²)
     * @param elements         truth mesh elements
     * @param nodes            truth mesh nodes
     * @param chestWallNodes   chest-wall nodes of the truth mesh
     * @param prone            prone solve diagnostics
     * @param supine           supine solve diagnostics
     * @param densityKgM3      density per label (index = label), kg/m³
     * @param chestWallSliding true if the chest wall slides (with priors: fixed rim), false if fixed
     * @param priorDraw        the draw from the planner's priors ({@link PhantomOptions.Truth#PRIORS}),
     *                         else null
     */
    public record Conditions(double[] muKpa, double nu, double densityScale, double torsoRotationDeg,
                             double[] tableShiftMm, double[] supineGravityMs2, int elements, int nodes,
                             int chestWallNodes, SolveResult prone, SolveResult supine, double[] densityKgM3,
                             boolean chestWallSliding, PriorDesign.Sample priorDraw) {
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
     * The truth conditions of {@link PhantomOptions.Truth#PRIORS} for a seed: one draw from the
     * planner's default priors ({@link DefaultPriors#spec()}) from its own seeded stream.
     */
    public static PriorDesign.Sample priorDraw(long seed) {
        return new PriorDesign(DefaultPriors.spec()).draw(new SplittableRandom(MrRenderer.mix(seed, PRIOR_STREAM)));
    }

    /**
     * Meshes and solves both postures.
     *
     * @param anatomy       the reference anatomy
     * @param referenceLabels its labels on {@code anatomy.grid()}
     * @param progress      progress ("truth mechanics")
     * @throws SolverDivergedException    if a truth solve fails in the default mode
     * @throws PriorDrawNotSolvedException if a truth solve fails for a draw from the priors
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
        boolean priors = o.truth() == PhantomOptions.Truth.PRIORS;
        int[] labels = {MaterialTable.FAT, MaterialTable.FIBROGLANDULAR, MaterialTable.SKIN, MaterialTable.LESION};
        double[] mu = new double[6];
        double[] rho = new double[6];
        NodeConstraints bc;
        MaterialTable mats;
        double nu;
        double densityScale;
        boolean sliding;
        PriorDesign.Sample draw = null;
        if (priors) {
            // One draw from the planner's default priors, built into materials and constraints by the
            // planner's own code.
            draw = priorDraw(o.seed());
            double[] d = DefaultPriors.densitiesKgM3();
            mats = MechanicsModel.materials(draw, d);
            for (int t = 0; t < 4; t++) {
                mu[labels[t]] = draw.muKpa()[t];
                rho[labels[t]] = d[t];
            }
            nu = draw.nu();
            densityScale = 1;
            sliding = draw.sliding();
            bc = ChestWallConstraints.of(mesh, surface, wall, sliding);
        } else {
            // every contact node slides on its normal (no fixed rim); nodes without a normal are fixed
            bc = ChestWallConstraints.of(mesh.nodeCount(), wall, new boolean[mesh.nodeCount()], true);
            // Truth materials: log-normal per tissue about the defaults, another ν, scaled densities.
            densityScale = 0.97 + 0.06 * rng.nextDouble();
            mats = MaterialTable.empty();
            for (int l : labels) {
                NeoHookeanMaterial d = MaterialTable.DEFAULTS.get(l);
                double z = Math.max(-MAX_Z, Math.min(MAX_Z, gaussian(rng)));
                mu[l] = d.muKpa() * StrictMath.exp(z * StrictMath.log(STIFFNESS_GSD));
                rho[l] = (l == MaterialTable.FAT || l == MaterialTable.FIBROGLANDULAR)
                        ? d.densityKgM3() * densityScale : d.densityKgM3();
                mats = mats.with(l, NeoHookeanMaterial.ofMuNu(mu[l], TRUTH_NU, rho[l]));
            }
            nu = TRUTH_NU;
            sliding = true;
        }
        double sign = rng.nextDouble() < 0.5 ? -1 : 1;
        double rotDeg = sign * (2 + 2 * rng.nextDouble());
        double[] shift = {8 * rng.nextDouble() - 4, 4 * rng.nextDouble() - 2, 8 * rng.nextDouble() - 4};
        Affine3D rot = Affine3D.translation(0, PhantomAnatomy.TORSO_CY_MM, 0)
                .compose(Affine3D.rotation(0, 0, 1, Math.toRadians(rotDeg)))
                .compose(Affine3D.translation(0, -PhantomAnatomy.TORSO_CY_MM, 0));
        Affine3D supinePlacement = Affine3D.translation(shift[0], shift[1], shift[2]).compose(rot);
        double[] gSupine;
        if (priors) {
            // Gravity in the body frame as the planner turns it; the placement is an image-frame nuisance.
            gSupine = MechanicsModel.supineGravity(G, draw.gravityRollDeg(), draw.gravityPitchDeg());
        } else {
            // Gravity is −y in the supine image frame; in the body (chest-wall) frame it is R⁻¹(0, −g, 0).
            gSupine = new double[] {0, -G, 0};
            rot.inverse().applyVector(gSupine, gSupine);
        }
        SolverConfig cfg = SolverConfig.defaults();
        SolveResult rp;
        SolveResult rs;
        try {
            progress.update("truth prone solve", 0);
            rp = HyperelasticSolver.solve(mesh, mats, bc, new double[] {0, G, 0}, cfg,
                    progress.sub("truth prone solve", 0, 1), null);
            progress.update("truth supine solve", 0);
            rs = HyperelasticSolver.solve(mesh, mats, bc, gSupine, cfg,
                    progress.sub("truth supine solve", 0, 1), null);
        } catch (SolverDivergedException e) {
            if (!priors) {
                throw e;
            }
            throw new PriorDrawNotSolvedException(draw, e);
        }
        TruthPosture prone = dense(anatomy, mesh, rp.u(), Affine3D.identity());
        TruthPosture supine = dense(anatomy, mesh, rs.u(), supinePlacement);
        Conditions c = new Conditions(mu, nu, densityScale, rotDeg, shift, gSupine, mesh.elementCount(),
                mesh.nodeCount(), wall.nodes().length, rp, rs, rho, sliding, draw);
        return new TruthMechanics(prone, supine, c);
    }

    /** The drawn conditions in plain words with units. */
    static String describe(PriorDesign.Sample s) {
        double[] m = s.muKpa();
        return String.format(Locale.ROOT, "mu fat %.4g, fibroglandular %.4g, skin %.4g, lesion %.4g kPa; nu %.4f; "
                + "chest wall %s; gravity roll %.2f deg, pitch %.2f deg", m[0], m[1], m[2], m[3], s.nu(),
                s.sliding() ? "sliding" : "fixed", s.gravityRollDeg(), s.gravityPitchDeg());
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
