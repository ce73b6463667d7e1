package org.turnmark.app.pipeline;

import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.mesh.DenseDisplacement;
import org.turnmark.mechanics.mesh.DisplacementFieldSampler;
import org.turnmark.mechanics.mesh.LabelMesher;
import org.turnmark.mechanics.mesh.PointMap;
import org.turnmark.registration.diffeo.DiffeomorphicRegistration;
import org.turnmark.registration.diffeo.PreAlignment;
import org.turnmark.registration.diffeo.RegistrationConfig;
import org.turnmark.registration.diffeo.RegistrationInput;
import org.turnmark.registration.diffeo.RegistrationResult;
import org.turnmark.registration.diffeo.RigidAligner;
import org.turnmark.registration.resample.Interp;
import org.turnmark.registration.resample.Outside;
import org.turnmark.registration.resample.Resampler;
import org.turnmark.registration.transform.DisplacementFields;
import org.turnmark.registration.transform.JacobianStats;
import org.turnmark.registration.transform.Jacobians;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * The supine-image part of a plan.
 *
 * <ol>
 *   <li>Rigid alignment T (supine image frame → prone image frame) of the supine image to the prone
 *       image warped by the mechanics prediction (the predicted supine shape with the chest wall held
 *       in place), over the whole image: the breast the mechanics predicts pulls on it as well as the
 *       torso, which on the calibration phantoms makes the mechanics-only and hybrid predictions better
 *       than an alignment of the torso alone (docs/planner.md, "Rigid alignment"). When the image holds
 *       enough of the chest wall to fix its own placement ({@link #CHEST_WALL_MIN_SPAN_MM} left to right),
 *       the chest wall alone is also aligned ({@link RigidAligner}) as a check: how far the two
 *       alignments carry a lesion apart is the share of the mechanics prediction's error that the
 *       whole-image alignment takes up as a rigid motion.</li>
 *   <li>Hybrid: the residual diffeomorphic registration of the prone image (moving) to the supine
 *       image (fixed), initialised with φ₀ = M⁻¹ ∘ T (M the mechanics prone → supine map), so the
 *       total map y ↦ y + u(y) sends a supine voxel to its prone tissue point.</li>
 *   <li>Registration-only baseline: the same registration from a rigid start (its own rigid
 *       pre-alignment of the supine image to the prone image), no mechanics.</li>
 * </ol>
 * A prone point p is carried to the supine frame by inverting y + u(y) = p with the fixed-point
 * iteration y ← p − u(y) (converges where |∇u| &lt; 1, true for a fold-free smooth map away from
 * strong compression), started from the mechanics-only estimate.
 */
final class SupineStage {

    /**
     * Hybrid covariance: the share w of the mechanics-only covariance (supine frame) that the hybrid keeps:
     * Σ_h = a K + s² I + w Σ_mech (docs/planner.md, Uncertainty). Fitted by maximum likelihood with
     * {@link CaseFileReader#DEFAULT_REGISTRATION_SD_MM} on the calibration runs at 6 mm elements with the
     * field-of-view cut held (seeds 131–214 pooled, 69 lesions; ML 0.177, SE 0.046); of the three forms tried
     * (this one; an isotropic term growing with the hybrid's correction of the mechanics, or with its distance
     * from the registration-only prediction) it has the best leave-one-out likelihood: 63 of 69 left-out
     * lesions inside the 95 % ellipsoid, mean d² 3.13 (docs/benchmarks.md).
     */
    static final double HYBRID_MECHANICS_WEIGHT = 0.18;
    /** Fixed-point iterations and tolerance (mm) for inverting a displacement field at a point. */
    static final int INVERSE_ITERATIONS = 100;
    static final double INVERSE_TOLERANCE_MM = 0.01;
    /** Finite-difference step (mm) for the Jacobian of a field map: about a voxel. */
    static final double JACOBIAN_STEP_MM = 1.0;
    /** How the rigid alignment is found, as plan.json states it: the whole-image step. */
    static final String ALIGNMENT_METHOD = "rigid intensity alignment (LNCC, BOBYQA at about 4x the finest spacing) "
            + "of the supine image to the predicted supine image (prone image warped by the mechanics), whole image";
    /** How the rigid alignment is found when the case asks for the chest wall alone, as plan.json states it. */
    static final String CHEST_WALL_METHOD = "rigid intensity alignment of the supine image to the predicted supine "
            + "image (prone image warped by the mechanics): whole image, then the chest wall alone (similarity "
            + "restricted to the chest-wall label of the prediction; LNCC, BOBYQA restarted while it improves, at "
            + "16, 8 and 4 mm), as the case asks (rigid_alignment \"chest_wall\")";
    /** Said of a plan whose predictions are carried by the chest wall's own alignment. */
    static final String CHEST_WALL_WARNING = "the predictions in the supine frame use the chest wall's own alignment, "
            + "as the case asks (rigid_alignment \"chest_wall\"); on synthetic chest-wide images this made the "
            + "mechanics-only and hybrid predictions worse than the whole-image alignment (hybrid 5.8 against 2.1 mm "
            + "on average) and their ellipsoids too small (hybrid 17 of 31 inside the 95 % ellipsoid), which were "
            + "calibrated with the whole-image alignment";
    /**
     * Left-to-right span (mm) of the chest-wall label from which the chest wall alone is aligned as a check.
     * A field of view around one breast shows 130–140 mm of chest wall (the bundled phantoms), which does not
     * fix the torso's placement: measured, a chest-wall-only alignment then lands further from the truth
     * than the whole-image one (docs/planner.md). A bilateral field of view shows the sternum and both sides
     * (about 300 mm on the chest field-of-view phantoms), and there it lands within about 1 mm RMS over the
     * chest wall (docs/benchmarks.md). 200 mm lies between; a stated heuristic.
     */
    static final double CHEST_WALL_MIN_SPAN_MM = 200;
    /** Grid spacings (mm) of the chest-wall refinement's levels, coarsest first. */
    static final double[] CHEST_WALL_LEVELS_MM = {16, 8, 4};

    private final Affine3D supineToProneFrame;
    private final VectorField hybrid;
    private final VectorField regOnly;
    private final VectorField mechSupine;
    private final RegistrationResult hybridResult;
    private final RegistrationResult regResult;
    private final Volume prone;
    private final Volume supine;
    private final List<String> warnings;
    private final PointMap mechanics;
    /** How T was found, in words. */
    private final String alignmentMethod;
    /**
     * The other alignment, for the check (supine image frame → prone image frame): the chest wall's own when
     * T is the whole-image one, the whole-image one when T is the chest wall's; null when the chest wall is
     * not in view.
     */
    private final Affine3D chestWall;

    private SupineStage(PointMap mechanics, Affine3D t, String alignmentMethod, Affine3D chestWall, VectorField hybrid,
                        VectorField regOnly,
                        VectorField mechSupine, RegistrationResult hr, RegistrationResult rr, Volume prone, Volume supine,
                        List<String> warnings) {
        this.chestWall = chestWall;
        this.alignmentMethod = alignmentMethod;
        this.supineToProneFrame = t;
        this.hybrid = hybrid;
        this.regOnly = regOnly;
        this.mechSupine = mechSupine;
        this.hybridResult = hr;
        this.regResult = rr;
        this.prone = prone;
        this.supine = supine;
        this.warnings = warnings;
        this.mechanics = mechanics;
    }

    /** The result handle used by the planner. */
    static final class Result {
        private final SupineStage s;

        Result(SupineStage s) {
            this.s = s;
        }

        /** Prone-frame point (chest wall in place) → supine image frame: T⁻¹. */
        double[] proneFrameToSupine(double[] x) {
            return s.supineToProneFrame.inverse().applyPoint(x[0], x[1], x[2]);
        }

        /** R Σ Rᵀ with R the rotation of T⁻¹. */
        double[] rotateCovariance(double[] cov) {
            double[] m = s.supineToProneFrame.inverse().toRowMajor();
            double[] r = {m[0], m[1], m[2], m[4], m[5], m[6], m[8], m[9], m[10]};
            return org.turnmark.app.uncertainty.Covariance3.propagate(r, cov);
        }

        double[] hybridPoint(double[] proneRas) {
            return s.invert(s.hybrid, proneRas);
        }

        double[] registrationOnlyPoint(double[] proneRas) {
            return s.invert(s.regOnly, proneRas);
        }

        double[] hybridInverse(double[] supineRas) {
            double[] out = new double[3];
            DisplacementFields.applyToPoint(s.hybrid, supineRas, out);
            return out;
        }

        double[] mechanicsInverse(double[] supineRas) {
            double[] out = new double[3];
            DisplacementFields.applyToPoint(s.mechSupine, supineRas, out);
            return out;
        }

        /** Node positions (3 per node) carried from the prone frame to the supine frame by T⁻¹. */
        double[] nodesToSupine(double[] nodes) {
            Affine3D inv = s.supineToProneFrame.inverse();
            double[] out = new double[nodes.length];
            double[] q = new double[3];
            for (int n = 0; n < nodes.length; n += 3) {
                q[0] = nodes[n];
                q[1] = nodes[n + 1];
                q[2] = nodes[n + 2];
                inv.applyPoint(q, q);
                out[n] = q[0];
                out[n + 1] = q[1];
                out[n + 2] = q[2];
            }
            return out;
        }

        /** The rigid alignment as the plan reports it. */
        PlanResult.RigidAlignment alignment() {
            Affine3D inv = s.supineToProneFrame.inverse();
            double[] m = inv.toRowMajor();
            double c = (m[0] + m[5] + m[10] - 1) / 2;
            double deg = Math.toDegrees(Math.acos(Math.max(-1, Math.min(1, c))));
            return new PlanResult.RigidAlignment(s.alignmentMethod, m, deg, new double[] {m[3], m[7], m[11]});
        }

        /**
         * How far apart (mm) the whole-image alignment and the chest wall's own alignment carry a prone-frame
         * point into the supine frame; null when the chest wall was not aligned on its own.
         */
        Double chestWallDifferenceMm(double[] proneFramePoint) {
            if (s.chestWall == null) {
                return null;
            }
            return carriedApartMm(s.supineToProneFrame, s.chestWall, proneFramePoint);
        }

        void flags(List<PlanResult.QualityFlag> flags) {
            PlanResult.RigidAlignment a = alignment();
            flags.add(new PlanResult.QualityFlag(PlanResult.QualityFlag.OK, "rigid alignment", String.format(Locale.ROOT,
                    "prone frame (chest wall held in place) to supine image: rotation %.2f deg, translation (%.1f, %.1f, "
                            + "%.1f) mm; %s",
                    a.rotationDeg(), a.translationMm()[0], a.translationMm()[1], a.translationMm()[2],
                    s.alignmentMethod.equals(ALIGNMENT_METHOD) ? "found on the whole image, so the breast shape the "
                            + "mechanics predicts also pulls on it (its error is part of the mechanics-only supine-frame "
                            + "uncertainty)" : "found on the chest wall alone, as the case asks")));
            // folding is judged inside the body of the supine image: the fields are extrapolated
            // into the air around it, where a fold moves no tissue
            boolean[] body = AutoSegmentation.bodyMask(s.supine);
            Volume mask = null;
            if (body != null) {
                float[] m = new float[body.length];
                for (int v = 0; v < m.length; v++) {
                    m[v] = body[v] ? 1f : 0f;
                }
                mask = new Volume(s.supine.grid(), m);
            }
            QualityFlags.registration(flags, "hybrid registration", s.hybridResult, true, inside(s.hybrid, mask));
            QualityFlags.registration(flags, "registration-only baseline", s.regResult, false, inside(s.regOnly, mask));
        }

        private static JacobianStats inside(VectorField u, Volume mask) {
            return mask == null ? null : Jacobians.summarize(Jacobians.determinant(u), mask);
        }

        void artifacts(Map<String, PlanArtifacts.Field> fields, Map<String, Volume> warped) {
            fields.put("hybrid", new PlanArtifacts.Field(s.hybrid, "supine->prone",
                    "supine image frame: for a supine voxel centre y, y + u(y) is the same tissue point in the prone "
                            + "image (RAS mm); mechanics start refined by diffeomorphic registration"));
            fields.put("mechanics_supine_frame", new PlanArtifacts.Field(s.mechSupine, "supine->prone",
                    "supine image frame: mechanics-only map after rigid alignment, y + u(y) is the prone point"));
            fields.put("registration_only", new PlanArtifacts.Field(s.regOnly, "supine->prone",
                    "supine image frame: registration from a rigid start without mechanics (baseline)"));
            Grid3 g = s.supine.grid();
            warped.put("mechanics_supine_frame", Resampler.resample(s.prone, g, null, s.mechSupine, Interp.LINEAR,
                    Outside.CONSTANT));
            warped.put("hybrid", Resampler.resample(s.prone, g, null, s.hybrid, Interp.LINEAR, Outside.CONSTANT));
            warped.put("registration_only", Resampler.resample(s.prone, g, null, s.regOnly, Interp.LINEAR,
                    Outside.CONSTANT));
        }
    }

    /**
     * Runs the three registrations.
     *
     * @param mechanics        the mechanics prone → supine map (prone frame)
     * @param chestWallSpanMm  {@link #chestWallSpanMm} of the labels (computed once by the planner)
     * @param chestWallCarries whether the case asks the chest wall's own alignment to carry the predictions
     */
    static Result run(Volume prone, Volume supine, Grid3 labelGrid, byte[] labels, PointMap mechanics,
                      double chestWallSpanMm, boolean chestWallCarries, Progress progress, List<String> warnings) {
        // Mechanics pull-back field on the prone grid (y in the predicted supine shape → prone point).
        PointMap inverse = reverse(mechanics);
        DenseDisplacement dd = DisplacementFieldSampler.sample(inverse, prone.grid(),
                DenseDisplacement.Extrapolation.nearestDecay(Planner.FIELD_DECAY_MM));
        VectorField mechPull = new VectorField(prone.grid(), dd.ux(), dd.uy(), dd.uz());
        Volume predictedSupine = Resampler.resample(prone, prone.grid(), null, mechPull, Interp.LINEAR, Outside.CONSTANT);

        progress.update("registration", 0.02);
        RegistrationConfig rigidOnly = RegistrationConfig.defaults().withPreAlignment(PreAlignment.RIGID)
                .withIterations(0);
        RegistrationResult align = new DiffeomorphicRegistration(rigidOnly).register(new RegistrationInput(supine,
                predictedSupine, null, null, null, "supine image", "mechanics prediction"), progress.sub("registration", 0.02, 0.1));
        Affine3D t = align.preAlignment();
        Affine3D chestWall = null;
        double span = chestWallSpanMm;
        if (span >= CHEST_WALL_MIN_SPAN_MM) {
            Volume wall = chestWallMask(labelGrid, labels, prone.grid());
            chestWall = RigidAligner.align(RegistrationConfig.defaults(), new RegistrationInput(supine, predictedSupine,
                    null, wall, null, "supine image", "mechanics prediction"), t, levels(supine.grid()),
                    progress.sub("registration", 0.06, 0.1)).fixedToMoving();
        }
        String method = ALIGNMENT_METHOD;
        if (chestWallCarries && chestWall != null) {
            // the check then compares with the whole-image alignment
            Affine3D whole = t;
            t = chestWall;
            chestWall = whole;
            method = CHEST_WALL_METHOD;
            warnings.add(CHEST_WALL_WARNING);
        } else if (chestWallCarries) {
            warnings.add(String.format(Locale.ROOT, "rigid_alignment \"chest_wall\" was asked for, but the chest wall "
                    + "in the image spans only %.0f mm left to right (at least %.0f mm are needed to fix its placement): "
                    + "the whole image was used", span, CHEST_WALL_MIN_SPAN_MM));
        }

        // φ₀ = M⁻¹ ∘ T on the supine grid.
        VectorField tField = DisplacementFields.fromAffine(t, supine.grid());
        VectorField phi0 = DisplacementFields.compose(mechPull, tField);
        progress.update("registration", 0.1);
        RegistrationConfig cfg = RegistrationConfig.defaults();
        RegistrationResult hr = new DiffeomorphicRegistration(cfg).register(new RegistrationInput(supine, prone, null,
                null, phi0, "supine image", "prone image"), progress.sub("registration", 0.1, 0.55));
        RegistrationResult rr = new DiffeomorphicRegistration(cfg.withPreAlignment(PreAlignment.RIGID)).register(
                new RegistrationInput(supine, prone, null, null, null, "supine image", "prone image"),
                progress.sub("registration", 0.55, 1.0));
        if (!hr.improved()) {
            warnings.add("the hybrid registration could not improve on the mechanics start; the hybrid prediction "
                    + "equals the rigidly aligned mechanics-only prediction");
        }
        return new Result(new SupineStage(mechanics, t, method, chestWall, hr.displacement(), rr.displacement(), phi0, hr, rr, prone,
                supine, warnings));
    }

    /**
     * Distance (mm) between where two supine → prone-frame alignments put a prone-frame point in the supine
     * frame: |a⁻¹(p) − b⁻¹(p)|.
     */
    static double carriedApartMm(Affine3D a, Affine3D b, double[] p) {
        double[] x = a.inverse().applyPoint(p[0], p[1], p[2]);
        double[] y = b.inverse().applyPoint(p[0], p[1], p[2]);
        return Math.sqrt((x[0] - y[0]) * (x[0] - y[0]) + (x[1] - y[1]) * (x[1] - y[1]) + (x[2] - y[2]) * (x[2] - y[2]));
    }

    /**
     * Left-to-right span (mm) of the chest-wall voxels ({@link LabelMesher#CHEST_WALL}): max − min of their
     * world (RAS) x; 0 when none.
     */
    static double chestWallSpanMm(Grid3 g, byte[] labels) {
        double[] m = g.voxelToWorld().toRowMajor();
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        int n = 0;
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++, n++) {
                    if (labels[n] == LabelMesher.CHEST_WALL) {
                        double x = m[0] * i + m[1] * j + m[2] * k + m[3];
                        lo = Math.min(lo, x);
                        hi = Math.max(hi, x);
                    }
                }
            }
        }
        return hi >= lo ? hi - lo : 0;
    }

    /** The chest-wall label as a 0/1 mask on {@code target} (nearest neighbour when the grids differ). */
    static Volume chestWallMask(Grid3 labelGrid, byte[] labels, Grid3 target) {
        float[] m = new float[labels.length];
        for (int v = 0; v < m.length; v++) {
            m[v] = labels[v] == LabelMesher.CHEST_WALL ? 1f : 0f;
        }
        Volume onLabels = new Volume(labelGrid, m);
        return labelGrid.sameGrid(target, DisplacementFields.GRID_TOLERANCE_MM) ? onLabels
                : Resampler.resample(onLabels, target, null, null, Interp.NEAREST, Outside.CONSTANT);
    }

    /** Pyramid levels nearest to {@link #CHEST_WALL_LEVELS_MM} for a grid, coarsest first, without repeats. */
    static int[] levels(Grid3 g) {
        double h = Math.min(g.spacingMm(0), Math.min(g.spacingMm(1), g.spacingMm(2)));
        java.util.List<Integer> out = new java.util.ArrayList<>();
        for (double mm : CHEST_WALL_LEVELS_MM) {
            int l = Math.max(0, Math.min(RegistrationConfig.MAX_LEVELS - 1,
                    (int) Math.round(Math.log(mm / h) / Math.log(2))));
            if (out.isEmpty() || out.get(out.size() - 1) > l) {
                out.add(l);
            }
        }
        return out.stream().mapToInt(Integer::intValue).toArray();
    }

    private static PointMap reverse(PointMap m) {
        if (m instanceof org.turnmark.mechanics.mesh.ConfigurationMap cm) {
            return cm.reversed();
        }
        throw new IllegalArgumentException("the mechanics map must be a configuration map");
    }

    /**
     * Solves y + u(y) = p for y: Newton's method with a central-difference Jacobian of y + u(y)
     * (step {@link #JACOBIAN_STEP_MM}), started from the mechanics-only estimate T⁻¹(M(p)).
     */
    private double[] invert(VectorField u, double[] p) {
        double[] start = new double[3];
        if (!mechanics.evaluator().map(p[0], p[1], p[2], start)) {
            System.arraycopy(p, 0, start, 0, 3);
        }
        double[] y = supineToProneFrame.inverse().applyPoint(start[0], start[1], start[2]);
        double[] img = new double[3];
        double[] a = new double[3];
        double[] b = new double[3];
        double[] jac = new double[9];
        double res = Double.POSITIVE_INFINITY;
        for (int it = 0; it < INVERSE_ITERATIONS; it++) {
            DisplacementFields.applyToPoint(u, y, img);
            double rx = img[0] - p[0];
            double ry = img[1] - p[1];
            double rz = img[2] - p[2];
            res = Math.sqrt(rx * rx + ry * ry + rz * rz);
            if (res < INVERSE_TOLERANCE_MM) {
                return y;
            }
            for (int c = 0; c < 3; c++) {
                double[] yp = y.clone();
                double[] ym = y.clone();
                yp[c] += JACOBIAN_STEP_MM;
                ym[c] -= JACOBIAN_STEP_MM;
                DisplacementFields.applyToPoint(u, yp, a);
                DisplacementFields.applyToPoint(u, ym, b);
                for (int r = 0; r < 3; r++) {
                    jac[3 * r + c] = (a[r] - b[r]) / (2 * JACOBIAN_STEP_MM);
                }
            }
            double[] d = solve3(jac, new double[] {rx, ry, rz});
            if (d == null) {
                d = new double[] {rx, ry, rz};
            }
            y[0] -= d[0];
            y[1] -= d[1];
            y[2] -= d[2];
        }
        warnings.add(String.format(Locale.ROOT, "inverting a displacement field at (%.1f, %.1f, %.1f) mm left a "
                + "residual of %.2f mm", p[0], p[1], p[2], res));
        return y;
    }

    /** Solves J d = r by Cramer's rule; null when J is (nearly) singular. */
    static double[] solve3(double[] j, double[] r) {
        double det = j[0] * (j[4] * j[8] - j[5] * j[7]) - j[1] * (j[3] * j[8] - j[5] * j[6])
                + j[2] * (j[3] * j[7] - j[4] * j[6]);
        if (!(Math.abs(det) > 1e-9)) {
            return null;
        }
        double[] d = new double[3];
        for (int c = 0; c < 3; c++) {
            double[] m = j.clone();
            m[c] = r[0];
            m[3 + c] = r[1];
            m[6 + c] = r[2];
            d[c] = (m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6])
                    + m[2] * (m[3] * m[7] - m[4] * m[6])) / det;
        }
        return d;
    }
}
