package org.turnmark.app.pipeline;

import java.time.Instant;
import java.time.temporal.ChronoUnit;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.turnmark.app.uncertainty.Covariance3;
import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.app.uncertainty.PriorDesign;
import org.turnmark.app.uncertainty.Sensitivity;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.geom.ResearchUse;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.mesh.ConfigurationMap;
import org.turnmark.mechanics.mesh.DenseDisplacement;
import org.turnmark.mechanics.mesh.DisplacementFieldSampler;
import org.turnmark.mechanics.mesh.PointMap;
import org.turnmark.mechanics.solve.NodeConstraints;
import org.turnmark.mechanics.solve.SolveResult;
import org.turnmark.registration.resample.Interp;
import org.turnmark.registration.resample.Outside;
import org.turnmark.registration.resample.Resampler;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * The planner: case in, predictions with uncertainty out (no files written here; see the export
 * package). Stages, in order: read inputs → segmentation (when no labels are given) → mesh →
 * reference state → supine reload (mechanics-only) → registration (with a supine image: hybrid and
 * registration-only) → uncertainty (prior sampling with warm-started solves) → descriptors and
 * quality flags. Progress goes to a {@link Progress} with the stage names of {@link #STAGES}.
 *
 * <p>Frames: the mechanics-only prediction lives in the prone image frame with the chest wall held
 * in place; with a supine image every method is also expressed in the supine image frame.
 * Not thread safe; one plan per instance at a time.
 */
public final class Planner {

    /** Stage names and their expected share of the run time (for the progress estimate). */
    public static final Map<String, Double> STAGES = stages();

    /** Finite-difference step for the Jacobian of the point map at a lesion (mm): about an element. */
    static final double JACOBIAN_STEP_MM = 2.0;
    /** Length over which the mechanics field decays to zero outside the tissue (mm). */
    static final double FIELD_DECAY_MM = 15.0;

    private static Map<String, Double> stages() {
        Map<String, Double> m = new LinkedHashMap<>();
        m.put("reading inputs", 0.02);
        m.put("segmentation", 0.03);
        m.put("mesh", 0.02);
        m.put("reference state", 0.12);
        m.put("supine reload", 0.03);
        m.put("registration", 0.20);
        m.put("uncertainty", 0.55);
        m.put("descriptors and flags", 0.03);
        return m;
    }

    /**
     * Run options that override the case file.
     *
     * @param samples number of prior samples, or null for the case's value
     */
    public record Options(Integer samples) {
        public static final Options DEFAULT = new Options(null);
    }

    /** A finished plan: the reportable result and the large artifacts. */
    public record Outcome(PlanResult result, PlanArtifacts artifacts) {
    }

    /**
     * Runs a plan.
     *
     * @throws PlanInputException  for input that cannot be planned
     * @throws PlanFailedException when a computation does not converge
     */
    public Outcome run(CaseFile c, Options options, Progress progress) {
        StageTimer timer = new StageTimer(progress, STAGES);
        List<String> warnings = new ArrayList<>();
        List<PlanResult.QualityFlag> flags = new ArrayList<>();

        Progress p = timer.begin("reading inputs");
        Volume prone = CaseInputs.readImage("prone_image", c.proneImage());
        Volume supine = c.hasSupine() ? CaseInputs.readImage("supine_image", c.supineImage()) : null;
        Map<String, String> hashes = CaseInputs.hashes(c);
        Volume labelVolume;
        byte[] labels;
        boolean segmented = c.labels() == null;
        if (!segmented) {
            labelVolume = CaseInputs.readImage("labels", c.labels());
            labels = CaseInputs.labelBytes(labelVolume, c.labels());
            timer.skip("segmentation");
        } else {
            p = timer.begin("segmentation");
            AutoSegmentation.Result seg = AutoSegmentation.segment(prone, c.chestWallPlaneRasMm(), p);
            labels = seg.labels();
            labelVolume = seg.asVolume();
            warnings.addAll(seg.notes());
        }
        Grid3 lg = labelVolume.grid();
        double midlineX = midlineX(lg, labels);

        // Lesions: mark → world → refined centroid; must lie in breast tissue.
        List<LesionInput> lesions = new ArrayList<>();
        for (CaseFile.LesionMark m : c.lesions()) {
            double[] mark = CaseInputs.markRasMm(m, prone.grid());
            CaseInputs.Centroid cen = CaseInputs.refine(m, mark, prone, lg, labels);
            int l = CaseInputs.labelAt(lg, labels, cen.rasMm());
            if (l == 0 || l == 4) {
                throw new PlanInputException(String.format(Locale.ROOT,
                        "lesion %s at (%.1f, %.1f, %.1f) mm lies outside the breast tissue (label %d: %s); "
                                + "check the mark, its frame (RAS mm) and the labels", m.id(), cen.rasMm()[0],
                        cen.rasMm()[1], cen.rasMm()[2], l, l == 0 ? "air/outside" : "chest wall"));
            }
            String side = m.side() != null ? m.side() : cen.rasMm()[0] < midlineX ? "left" : "right";
            lesions.add(new LesionInput(m, side, mark, cen));
        }

        p = timer.begin("mesh");
        double h = c.model().elementSizeMm();
        MechanicsModel model;
        try {
            model = MechanicsModel.build(lg, labels, h);
        } catch (IllegalArgumentException e) {
            throw new PlanInputException("cannot build the finite-element model from the labels: " + e.getMessage(), e);
        }
        warnings.addAll(model.labelMesh().warnings());
        String cutWarning = model.breastCutWarning();
        if (cutWarning != null) {
            warnings.add(cutWarning);
        }
        double chestWallSpan = SupineStage.chestWallSpanMm(lg, labels);
        String wide = wideFieldWarning(chestWallSpan);
        boolean wideField = wide != null;
        if (wideField) {
            warnings.add(wide);
        }
        for (LesionInput li : lesions) {
            model.requireModelled("lesion " + li.mark.id(), li.centroid.rasMm());
        }
        Surfaces surfaces = Surfaces.of(model.proneMesh(), model.chestWall().nodes());

        // Nipples: given, else detected; checked against the skin surface of the mesh.
        Map<String, double[]> nipples = new LinkedHashMap<>();
        for (CaseFile.NippleMark n : c.nipples()) {
            nipples.put(n.side(), n.positionRasMm());
        }
        for (LesionInput li : lesions) {
            if (!nipples.containsKey(li.side)) {
                double[] det = CaseInputs.detectNipple(lg, labels, li.side, midlineX);
                if (det == null) {
                    throw new PlanInputException("lesion " + li.mark.id() + " is in the " + li.side
                            + " breast, but no tissue was found on that side to detect a nipple; give \"nipples\"");
                }
                nipples.put(li.side, det);
                warnings.add(String.format(Locale.ROOT, "%s nipple detected automatically at (%.1f, %.1f, %.1f) mm "
                        + "(most anterior skin point)", li.side, det[0], det[1], det[2]));
            }
        }
        double[] tmp = new double[3];
        for (Map.Entry<String, double[]> e : nipples.entrySet()) {
            double d = surfaces.closestSkin(model.proneMesh().xyzMm(), e.getValue(), tmp);
            if (d > CaseInputs.NIPPLE_SKIN_WARNING_MM + h) {
                warnings.add(String.format(Locale.ROOT, "the %s nipple (%.1f, %.1f, %.1f) mm is %.1f mm from the skin "
                        + "surface of the model (expected on the skin); descriptors use it as given", e.getKey(),
                        e.getValue()[0], e.getValue()[1], e.getValue()[2], d));
            }
        }

        // Nominal mechanics.
        PriorDesign design = new PriorDesign(spec(c.priors()));
        PriorDesign.Sample nominal0 = design.nominal();
        PriorDesign.Sample nominal = new PriorDesign.Sample(nominal0.muKpa(), c.priors().nu().nominal(),
                nominal0.sliding(), 0, 0, nominal0.u(), nominal0.score());
        boolean sliding = c.model().chestWall() == null ? nominal.sliding() : c.model().chestWall().equals("sliding");
        double[] rho = densities(c.priors());
        MaterialTable mats = MechanicsModel.materials(nominal, rho);
        NodeConstraints bc = model.constraints(sliding);
        double g = c.model().gravityMS2();
        Map<String, PlanResult.SolveSummary> solves = new LinkedHashMap<>();
        p = timer.begin("reference state");
        MechanicsModel.Reference ref;
        SolveResult sup;
        try {
            ref = model.referenceFromProne(mats, bc, MechanicsModel.proneGravity(g), p);
            solves.put("reference state (prone reload)", summary(ref.lastSolve(), ref.iterations(), ref.residualMm(),
                    ref.seconds()));
            p = timer.begin("supine reload");
            sup = model.supine(mats, bc, ref, MechanicsModel.supineGravity(g, 0, 0), null);
            solves.put("supine reload", summary(sup, sup.loadSteps(), sup.relativeResidual(), sup.timeMs() / 1e3));
        } catch (MechanicsModel.ReferenceNotConvergedException e) {
            throw new PlanFailedException(e.getMessage(), e);
        } catch (RuntimeException e) {
            if (e instanceof Progress.CancelledException) {
                throw e;
            }
            throw new PlanFailedException("the nominal finite-element solve failed: " + e.getMessage(), e);
        }
        ConfigurationMap mech = model.proneToSupine(ref, sup);
        double[] supNodes = MechanicsModel.supineNodes(ref, sup);

        // Registration (hybrid and registration-only) with a supine image.
        SupineStage.Result reg = null;
        if (supine != null) {
            p = timer.begin("registration");
            reg = SupineStage.run(prone, supine, lg, labels, mech, chestWallSpan,
                    CaseFile.ALIGN_CHEST_WALL.equals(c.rigidAlignment()), p, warnings);
        } else {
            timer.skip("registration");
            warnings.add("no supine image: only the mechanics-only prediction (prone image frame, chest wall held "
                    + "in place) and the descriptors are produced");
        }

        // Uncertainty by sampling the priors, warm-started from the nominal solves.
        int nSamples = options.samples() != null ? options.samples() : c.uncertainty().samples();
        p = timer.begin("uncertainty");
        List<double[][]> samplePositions = new ArrayList<>();
        List<double[]> sampleScores = new ArrayList<>();
        int failed = 0;
        List<PriorDesign.Sample> samples = design.samples(nSamples, c.uncertainty().design(), c.uncertainty().seed());
        for (int s = 0; s < samples.size(); s++) {
            PriorDesign.Sample smp = samples.get(s);
            p.update("uncertainty", s / (double) samples.size());
            try {
                MaterialTable ms = MechanicsModel.materials(smp, rho);
                NodeConstraints bs = model.constraints(smp.sliding());
                MechanicsModel.Reference rs = model.reference(ms, bs, MechanicsModel.proneGravity(g),
                        ref.referenceXyzMm(), ref.proneU(), Progress.NONE);
                SolveResult ss = model.supine(ms, bs, rs, MechanicsModel.supineGravity(g, smp.gravityRollDeg(),
                        smp.gravityPitchDeg()), sup.u());
                PointMap.Evaluator ev = model.proneToSupine(rs, ss).evaluator();
                double[][] pos = new double[lesions.size()][];
                for (int l = 0; l < lesions.size(); l++) {
                    pos[l] = mapOrNearest(ev, lesions.get(l).centroid.rasMm(), model, rs, ss);
                }
                samplePositions.add(pos);
                sampleScores.add(smp.score());
            } catch (RuntimeException e) {
                if (e instanceof Progress.CancelledException) {
                    throw e;
                }
                failed++;
                warnings.add("uncertainty sample " + (s + 1) + " did not converge and was left out: " + e.getMessage());
            }
        }
        p.update("uncertainty", 1);

        p = timer.begin("descriptors and flags");
        PriorDesign.Parameter[] params = PriorDesign.Parameter.values();
        String[] names = new String[params.length];
        for (PriorDesign.Parameter prm : params) {
            names[prm.ordinal()] = prm.key();
        }
        Map<String, double[]> truth = truthSupine(c);
        List<String> chestWallDiff = new ArrayList<>();
        List<PlanResult.LesionResult> lesionResults = new ArrayList<>();
        List<Ellipsoid> ellProne = new ArrayList<>();
        List<Ellipsoid> ellSupine = new ArrayList<>();
        PointMap.Evaluator mev = mech.evaluator();
        double[] proneNodes = MechanicsModel.proneNodes(ref);
        double[] supNodesS = reg == null ? null : reg.nodesToSupine(supNodes);
        for (int l = 0; l < lesions.size(); l++) {
            LesionInput li = lesions.get(l);
            double[] x0 = li.centroid.rasMm();
            double[] nip = nipples.get(li.side);
            Descriptors.Descriptor dProne = describe(li.side, x0, nip, surfaces, proneNodes);
            List<PlanResult.Prediction> preds = new ArrayList<>();
            // Mechanics-only, prone frame.
            double[] xm = mapOrNearest(mev, x0, model, ref, sup);
            double[] jac = jacobian(mev, x0, xm);
            double[] markCov = Covariance3.propagate(jac, Covariance3.isotropic(c.priors().lesionMarkingSdMm()));
            double[] covM = null;
            Sensitivity.Ranking rank = null;
            if (samplePositions.size() >= 2) {
                double[][] ps = new double[samplePositions.size()][];
                double[][] sc = new double[samplePositions.size()][];
                for (int s = 0; s < ps.length; s++) {
                    ps[s] = samplePositions.get(s)[l];
                    sc[s] = sampleScores.get(s);
                }
                covM = Covariance3.add(Covariance3.aboutReference(ps, xm), markCov);
                rank = Sensitivity.rank(names, sc, ps);
            }
            double[] nipSup = mapOrNearest(mev, nip, model, ref, sup);
            Descriptors.Descriptor dSup = describe(li.side, xm, nipSup, surfaces, supNodes);
            // Prone frame: k Σ_m + s_p² I, the sampled spread scaled up for the model error it does not span
            double[] covProne = covM == null ? null : proneCovariance(covM, c.priors(), wideField);
            preds.add(prediction(PlanResult.MECHANICS, PlanResult.FRAME_PRONE, x0, xm, covProne, dSup, rank, null,
                    ellProne));
            if (reg != null) {
                // Mechanics-only in the supine frame through the rigid alignment, then hybrid and registration-only.
                double[] xms = reg.proneFrameToSupine(xm);
                Double cw = reg.chestWallDifferenceMm(xm);
                if (cw != null) {
                    chestWallDiff.add(String.format(Locale.ROOT, "%s %.1f mm", li.mark.id(), cw));
                }
                // Σ = R Σ_m Rᵀ + s_m² I: the sampled spread rotated into the supine frame, plus the rigid
                // alignment's and the unsampled model error (docs/planner.md, Uncertainty).
                double[] covMs = covM == null ? null : Covariance3.add(reg.rotateCovariance(covM),
                        Covariance3.isotropic(c.priors().mechanicsSupineSdMm()));
                double[] truthS = truth.get(li.mark.id());
                preds.add(prediction(PlanResult.MECHANICS, PlanResult.FRAME_SUPINE, x0, xms, covMs,
                        describe(li.side, xms, reg.proneFrameToSupine(nipSup), surfaces, supNodesS), rank, err(truthS, xms),
                        ellSupine));
                double[] xh = reg.hybridPoint(x0);
                double[] xr = reg.registrationOnlyPoint(x0);
                // Hybrid covariance (docs/planner.md, Uncertainty): the marking term only when the centroid was
                // not refined on a lesion label (a label centroid carries no hand-marking error), the
                // registration's own error, and a share of the mechanics-only covariance (supine frame) that the
                // registration does not remove.
                PlanResult.CovarianceTerms terms = covMs == null ? null : new PlanResult.CovarianceTerms(
                        reg.rotateCovariance(markCov), li.centroid.onLabel() ? 0 : 1, c.priors().registrationSdMm(),
                        covMs.clone(), SupineStage.HYBRID_MECHANICS_WEIGHT);
                preds.add(prediction(PlanResult.HYBRID, PlanResult.FRAME_SUPINE, x0, xh, terms,
                        describe(li.side, xh, reg.hybridPoint(nip), surfaces, supNodesS), err(truthS, xh), ellSupine));
                preds.add(prediction(PlanResult.REGISTRATION, PlanResult.FRAME_SUPINE, x0, xr, null,
                        describe(li.side, xr, reg.registrationOnlyPoint(nip), surfaces, supNodesS), null, err(truthS, xr), null));
            }
            List<PlanResult.InverseMapping> inv = new ArrayList<>();
            if (li.mark.supinePositionRasMm() != null && reg != null) {
                double[] s = li.mark.supinePositionRasMm();
                inv.add(new PlanResult.InverseMapping(PlanResult.HYBRID, s, reg.hybridInverse(s)));
                inv.add(new PlanResult.InverseMapping(PlanResult.MECHANICS, s, reg.mechanicsInverse(s)));
            }
            lesionResults.add(new PlanResult.LesionResult(li.mark.id(), li.side, li.markRas, x0, li.centroid.how(),
                    dProne, preds, inv));
        }
        QualityFlags.mechanics(flags, ref, sup, failed, samples.size());
        if (reg != null) {
            reg.flags(flags);
            if (!chestWallDiff.isEmpty()) {
                flags.add(new PlanResult.QualityFlag(PlanResult.QualityFlag.OK, "chest-wall alignment check",
                        "the image shows the chest wall across the chest; aligning it alone and aligning the whole "
                                + "image carry the mechanics-only prediction this far apart: "
                                + String.join(", ", chestWallDiff) + ". That is the share of the mechanics prediction's "
                                + "error the whole-image alignment takes up as a rigid motion (not the whole error); on "
                                + "the phantoms taking it up made the mechanics-only and hybrid predictions better "
                                + "(docs/planner.md, Rigid alignment)"));
            }
            QualityFlags.disagreement(flags, lesionResults);
        }

        // Dense mechanics field for export and warping: for each prone-frame supine point y, y + u(y)
        // is the prone point (pull-back, so the prone image can be warped onto that grid).
        DenseDisplacement dd = DisplacementFieldSampler.sample(mech.reversed(), prone.grid(),
                DenseDisplacement.Extrapolation.nearestDecay(FIELD_DECAY_MM));
        VectorField mechField = new VectorField(prone.grid(), dd.ux(), dd.uy(), dd.uz());
        Map<String, PlanArtifacts.Field> fields = new LinkedHashMap<>();
        fields.put("mechanics", new PlanArtifacts.Field(mechField, "supine->prone",
                "prone image frame with the chest wall held in place: for a voxel centre y of the predicted supine "
                        + "shape, y + u(y) is the same tissue point in the prone image (RAS mm)"));
        Map<String, Volume> warped = new LinkedHashMap<>();
        warped.put("mechanics", Resampler.resample(prone, prone.grid(), null, mechField, Interp.LINEAR,
                Outside.CONSTANT));
        Map<String, double[]> pointFields = new LinkedHashMap<>();
        pointFields.put("u_prone_to_supine_mm", diff(supNodes, proneNodes));
        pointFields.put("u_reference_to_prone_mm", ref.proneU());
        Map<String, List<Ellipsoid>> ell = new LinkedHashMap<>();
        ell.put(PlanResult.FRAME_PRONE, ellProne);
        if (reg != null) {
            reg.artifacts(fields, warped);
            ell.put(PlanResult.FRAME_SUPINE, ellSupine);
        }
        timer.end();

        Map<String, Map<String, Double>> matSummary = new LinkedHashMap<>();
        String[] tissue = {"fat", "fibroglandular", "skin", "lesion"};
        for (int t = 0; t < 4; t++) {
            Map<String, Double> m = new LinkedHashMap<>();
            m.put("mu_kpa", nominal.muKpa()[t]);
            m.put("nu", nominal.nu());
            m.put("density_kg_m3", rho[t]);
            matSummary.put(tissue[t], m);
        }
        PlanResult.ModelSummary ms = new PlanResult.ModelSummary(h, model.proneMesh().elementCount(),
                model.proneMesh().nodeCount(), model.chestWall().size(), model.fieldOfViewNodes(),
                sliding ? "sliding" : "fixed", matSummary, solves);
        List<String> keys = new ArrayList<>(List.of(names));
        PlanResult.UncertaintySummary us = new PlanResult.UncertaintySummary(nSamples, samplePositions.size(),
                c.uncertainty().design(), c.uncertainty().seed(), keys,
                List.of(String.format(Locale.ROOT, "lesion marking (isotropic %.3g mm SD, propagated through the local "
                                + "deformation gradient; hybrid: only for centroids not refined on a lesion label)",
                                c.priors().lesionMarkingSdMm()),
                        String.format(Locale.ROOT, "registration (hybrid only: isotropic %.3g mm SD plus %.3g x the "
                                + "mechanics-only covariance in the supine frame)",
                                c.priors().registrationSdMm(), SupineStage.HYBRID_MECHANICS_WEIGHT),
                        String.format(Locale.ROOT, "rigid alignment and model error (mechanics-only in the supine frame, "
                                + "isotropic %.3g mm SD)", c.priors().mechanicsSupineSdMm()),
                        String.format(Locale.ROOT, "model error (mechanics-only in the prone frame: the sampled "
                                + "covariance x %.3g%s, plus isotropic %.3g mm SD)",
                                proneScale(c.priors(), wideField), wideField ? " (the factor for images showing the chest "
                                        + "wall across the chest)" : "", c.priors().mechanicsProneSdMm())));
        Map<String, String> software = new LinkedHashMap<>();
        String v = Planner.class.getPackage().getImplementationVersion();
        software.put("turnmark", v == null ? "development build" : v);
        software.put("java", System.getProperty("java.version"));
        PlanResult result = new PlanResult(ResearchUse.FULL, software,
                Instant.now().truncatedTo(ChronoUnit.SECONDS).toString(), c, hashes, timer.seconds(), ms, us,
                reg == null ? null : reg.alignment(), lesionResults, flags, warnings);
        PlanArtifacts art = new PlanArtifacts(prone, supine, labelVolume, segmented, fields, warped,
                model.proneMesh(), pointFields, ell);
        return new Outcome(result, art);
    }

    /** One lesion's inputs. */
    private record LesionInput(CaseFile.LesionMark mark, String side, double[] markRas, CaseInputs.Centroid centroid) {
    }

    private static PlanResult.Prediction prediction(String method, String frame, double[] x0, double[] x, double[] cov,
                                                    Descriptors.Descriptor d, Sensitivity.Ranking rank, Double err,
                                                    List<Ellipsoid> sink) {
        PlanResult.EllipsoidSummary e68 = null;
        PlanResult.EllipsoidSummary e95 = null;
        if (cov != null) {
            Ellipsoid a = Ellipsoid.of(x, cov, 0.6827);
            Ellipsoid b = Ellipsoid.of(x, cov, 0.95);
            e68 = PlanResult.EllipsoidSummary.of(a);
            e95 = PlanResult.EllipsoidSummary.of(b);
            if (sink != null) {
                sink.add(b);
            }
        }
        return new PlanResult.Prediction(method, frame, x, diff(x, x0), cov, e68, e95, d, rank, err);
    }

    /** A prediction whose covariance is the sum of {@code terms} (null terms: no covariance). */
    private static PlanResult.Prediction prediction(String method, String frame, double[] x0, double[] x,
                                                    PlanResult.CovarianceTerms terms, Descriptors.Descriptor d,
                                                    Double err, List<Ellipsoid> sink) {
        PlanResult.Prediction p = prediction(method, frame, x0, x, terms == null ? null : covariance(terms), d, null,
                err, sink);
        return new PlanResult.Prediction(p.method(), p.frame(), p.positionRasMm(), p.displacementMm(),
                p.covarianceMm2(), p.ellipsoid68(), p.ellipsoid95(), p.descriptors(), null, err, terms);
    }

    /** Σ = markingWeight · marking + registrationSdMm² I + mechanicsWeight · mechanics (mm²). */
    static double[] covariance(PlanResult.CovarianceTerms t) {
        double v = t.registrationSdMm() * t.registrationSdMm();
        double[] s = scale(t.markingMm2(), t.markingWeight());
        double[] m = t.mechanicsMm2();
        for (int k = 0; k < 9; k++) {
            s[k] += t.mechanicsWeight() * m[k];
        }
        s[0] += v;
        s[4] += v;
        s[8] += v;
        return s;
    }

    private static Double err(double[] truth, double[] x) {
        if (truth == null) {
            return null;
        }
        double dx = truth[0] - x[0];
        double dy = truth[1] - x[1];
        double dz = truth[2] - x[2];
        return Math.sqrt(dx * dx + dy * dy + dz * dz);
    }

    /** True supine centroids by lesion id (inline truth of synthetic cases), else empty. */
    static Map<String, double[]> truthSupine(CaseFile c) {
        Map<String, double[]> m = new LinkedHashMap<>();
        if (c.truth() != null && c.truth().lesions() != null) {
            for (CaseFile.TruthLesion t : c.truth().lesions()) {
                if (t.supineRasMm() != null) {
                    m.put(t.id(), t.supineRasMm());
                }
            }
        }
        return m;
    }

    static Descriptors.Descriptor describe(String side, double[] x, double[] nipple, Surfaces s, double[] nodes) {
        double[] tmp = new double[3];
        double[] wall = new double[3];
        double dSkin = s.closestSkin(nodes, x, tmp);
        // No chest-wall surface: the depth from it is unknown (null), not 0.
        Double dWall = s.hasChestWall() ? Double.valueOf(s.closestChestWall(nodes, x, tmp)) : null;
        if (s.hasChestWall()) {
            s.closestChestWall(nodes, nipple, wall);
        } else {
            wall = new double[] {nipple[0], nipple[1] - 1, nipple[2]};
        }
        return Descriptors.compute(side, x, nipple, wall, dSkin, dWall);
    }

    /**
     * Maps a point; a point just outside the voxel mesh (a surface point such as the nipple, or a
     * lesion in a partially meshed element) takes the displacement of the nearest prone node.
     */
    static double[] mapOrNearest(PointMap.Evaluator ev, double[] x, MechanicsModel model,
                                 MechanicsModel.Reference ref, SolveResult sup) {
        double[] out = new double[3];
        if (ev.map(x[0], x[1], x[2], out)) {
            return out;
        }
        double[] pn = MechanicsModel.proneNodes(ref);
        double[] sn = MechanicsModel.supineNodes(ref, sup);
        int best = MechanicsModel.nearestNode(pn, x);
        return new double[] {x[0] + sn[3 * best] - pn[3 * best], x[1] + sn[3 * best + 1] - pn[3 * best + 1],
            x[2] + sn[3 * best + 2] - pn[3 * best + 2]};
    }

    /** Central-difference Jacobian (row-major) of the map at x; identity where a neighbour is outside. */
    static double[] jacobian(PointMap.Evaluator ev, double[] x, double[] fx) {
        double[] j = new double[9];
        double[] a = new double[3];
        double[] b = new double[3];
        for (int c = 0; c < 3; c++) {
            double[] xp = x.clone();
            double[] xm = x.clone();
            xp[c] += JACOBIAN_STEP_MM;
            xm[c] -= JACOBIAN_STEP_MM;
            boolean okp = ev.map(xp[0], xp[1], xp[2], a);
            boolean okm = ev.map(xm[0], xm[1], xm[2], b);
            for (int r = 0; r < 3; r++) {
                double d;
                if (okp && okm) {
                    d = (a[r] - b[r]) / (2 * JACOBIAN_STEP_MM);
                } else if (okp) {
                    d = (a[r] - fx[r]) / JACOBIAN_STEP_MM;
                } else if (okm) {
                    d = (fx[r] - b[r]) / JACOBIAN_STEP_MM;
                } else {
                    d = r == c ? 1 : 0;
                }
                j[3 * r + c] = d;
            }
        }
        return j;
    }

    private static double[] diff(double[] a, double[] b) {
        double[] out = new double[a.length];
        for (int i = 0; i < a.length; i++) {
            out[i] = a[i] - b[i];
        }
        return out;
    }

    private static double[] scale(double[] a, double s) {
        double[] out = new double[a.length];
        for (int i = 0; i < a.length; i++) {
            out[i] = a[i] * s;
        }
        return out;
    }

    static PlanResult.SolveSummary summary(SolveResult r, int steps, double residual, double seconds) {
        return new PlanResult.SolveSummary(r.converged(), steps, r.newtonIterations(), r.minDetF(), residual,
                r.maxDisplacementMm(), seconds);
    }

    static PriorDesign.Spec spec(CaseFile.Priors p) {
        return new PriorDesign.Spec(
                new double[] {p.fat().muKpaMedian(), p.fibroglandular().muKpaMedian(), p.skin().muKpaMedian(),
                    p.lesion().muKpaMedian()},
                new double[] {p.fat().muGeometricSd(), p.fibroglandular().muGeometricSd(), p.skin().muGeometricSd(),
                    p.lesion().muGeometricSd()},
                p.nu().min(), p.nu().max(), p.chestWallSlidingProbability(), p.gravityDirectionSdDeg());
    }

    static double[] densities(CaseFile.Priors p) {
        return new double[] {p.fat().densityKgM3(), p.fibroglandular().densityKgM3(), p.skin().densityKgM3(),
            p.lesion().densityKgM3()};
    }

    /** x of the body midline: the mean x of the chest-wall voxels, else of all non-air voxels. */
    static double midlineX(Grid3 g, byte[] labels) {
        double[] sum = new double[2];
        double[] sumAll = new double[2];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    int l = labels[g.index(i, j, k)];
                    if (l == 0) {
                        continue;
                    }
                    double x = g.worldOf(i, j, k)[0];
                    sumAll[0] += x;
                    sumAll[1]++;
                    if (l == 4) {
                        sum[0] += x;
                        sum[1]++;
                    }
                }
            }
        }
        if (sum[1] > 0) {
            return sum[0] / sum[1];
        }
        return sumAll[1] > 0 ? sumAll[0] / sumAll[1] : 0;
    }

    /**
     * Said of a plan whose image shows the chest wall across the chest ({@link SupineStage#CHEST_WALL_MIN_SPAN_MM}):
     * the mechanics is further off there, and the prone-frame ellipsoid uses its own factor
     * (docs/benchmarks.md, "Chest field of view").
     */
    public static final String WIDE_FIELD_WARNING = "the image shows the chest wall across the chest: on synthetic "
            + "chest-wide images the mechanics-only prediction was further off than on images around one breast "
            + "(9.8 mm against 5.7 mm on average in the prone frame), so its prone-frame ellipsoid uses the larger "
            + "factor fitted on such images (mechanics_prone_scale_wide_field); the other ellipsoids are those "
            + "calibrated around one breast, which held the truth in 44 of 47 (mechanics-only, supine frame) and 42 "
            + "of 47 (hybrid) chest-wide cases";

    /**
     * The factor on the prone-frame sampled covariance: {@code mechanics_prone_scale_wide_field} for an image
     * showing the chest wall across the chest, else {@code mechanics_prone_scale}.
     */
    public static double proneScale(CaseFile.Priors p, boolean wideField) {
        return wideField ? p.mechanicsProneScaleWideField() : p.mechanicsProneScale();
    }

    /**
     * {@link #WIDE_FIELD_WARNING} when the chest-wall label spans the chest, else null.
     *
     * @param chestWallSpanMm {@link SupineStage#chestWallSpanMm} of the labels
     */
    static String wideFieldWarning(double chestWallSpanMm) {
        return chestWallSpanMm >= SupineStage.CHEST_WALL_MIN_SPAN_MM ? WIDE_FIELD_WARNING : null;
    }

    /**
     * The mechanics-only covariance in the prone image frame: k Σ_m + s_p² I, with Σ_m the sampled spread
     * plus the propagated marking error, k = {@link #proneScale} and s_p = {@code mechanics_prone_sd_mm}
     * (docs/planner.md, Uncertainty).
     *
     * @param wideField whether the image shows the chest wall across the chest ({@link #wideFieldWarning})
     */
    static double[] proneCovariance(double[] covM, CaseFile.Priors p, boolean wideField) {
        double[] k = covM.clone();
        double f = proneScale(p, wideField);
        for (int i = 0; i < 9; i++) {
            k[i] *= f;
        }
        return Covariance3.add(k, Covariance3.isotropic(p.mechanicsProneSdMm()));
    }

}
