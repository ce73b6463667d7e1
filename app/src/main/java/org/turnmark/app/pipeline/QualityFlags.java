package org.turnmark.app.pipeline;

import java.util.List;
import java.util.Locale;

import org.turnmark.mechanics.solve.ReferenceStateConfig;
import org.turnmark.mechanics.solve.SolveResult;
import org.turnmark.registration.diffeo.RegistrationResult;
import org.turnmark.registration.transform.JacobianStats;

/**
 * Quality checks of a plan, each turned into a flag in plain words with its numbers and units.
 * Thresholds are public constants with their reasons. Stateless.
 */
final class QualityFlags {

    /** det F below this in the supine reload means strong local compression worth a look (a 30 % volume loss). */
    static final double LOW_DET_F = 0.7;
    /** More than this fraction of failed uncertainty samples makes the ellipsoid doubtful. */
    static final double MAX_FAILED_FRACTION = 0.25;

    private QualityFlags() {
    }

    private static String f(String fmt, Object... args) {
        return String.format(Locale.ROOT, fmt, args);
    }

    static void mechanics(List<PlanResult.QualityFlag> flags, MechanicsModel.Reference ref, SolveResult sup,
                          int failedSamples, int samples) {
        String refText = ref.residualMm() <= MechanicsModel.REFERENCE_TOLERANCE_MM
                ? f("reference state converged in %d iterations: every node within %.2f mm of its prone position",
                        ref.iterations(), ref.residualMm())
                : ref.fallback()
                ? f("reference state did not meet its rule (%.0f %% of the nodes within %.2f mm): its best iterate, "
                        + "after %d forward solves, has %.1f %% of the nodes within %.2f mm of their prone positions "
                        + "and the furthest at %.2f mm; accepted because every node is within %.1f mm and at least "
                        + "%.0f %% within %.2f mm, but positions near the lagging nodes are less certain",
                        ReferenceStateConfig.PERCENTILE, MechanicsModel.REFERENCE_TOLERANCE_MM, ref.iterations(),
                        ref.withinPercent(), MechanicsModel.REFERENCE_TOLERANCE_MM, ref.residualMm(),
                        MechanicsModel.REFERENCE_MAX_MISMATCH_MM, ReferenceStateConfig.FALLBACK_PERCENTILE,
                        MechanicsModel.REFERENCE_TOLERANCE_MM)
                : f("reference state converged in %d iterations: %.1f %% of the nodes within %.2f mm of their prone "
                        + "positions (the rule asks %.0f %%), the furthest %.2f mm", ref.iterations(),
                        ref.withinPercent(), MechanicsModel.REFERENCE_TOLERANCE_MM, ReferenceStateConfig.PERCENTILE,
                        ref.residualMm());
        if (ref.heldNodes() > 0) {
            refText += f(" (%d nodes were held back where the prone mesh cannot be reproduced without collapsing an "
                    + "element, typically at the edge of the chest-wall contact)", ref.heldNodes());
        }
        flags.add(new PlanResult.QualityFlag(ref.fallback() ? PlanResult.QualityFlag.WARNING : PlanResult.QualityFlag.OK,
                "finite-element convergence",
                f("%s; supine reload converged in %d load steps (%d Newton iterations, relative residual %.1e)",
                        refText, sup.loadSteps(), sup.newtonIterations(), sup.relativeResidual())));
        double minDet = Math.min(ref.lastSolve().minDetF(), sup.minDetF());
        flags.add(new PlanResult.QualityFlag(minDet < LOW_DET_F ? PlanResult.QualityFlag.WARNING : PlanResult.QualityFlag.OK,
                "element distortion", f("smallest det F %.3f (prone %.3f, supine %.3f); %s", minDet,
                        ref.lastSolve().minDetF(), sup.minDetF(), minDet < LOW_DET_F
                                ? "strong local compression: check the mesh near the chest wall and the lesion"
                                : "no element is strongly compressed")));
        if (samples > 0) {
            boolean bad = failedSamples > MAX_FAILED_FRACTION * samples;
            flags.add(new PlanResult.QualityFlag(bad ? PlanResult.QualityFlag.PROBLEM
                    : failedSamples > 0 ? PlanResult.QualityFlag.WARNING : PlanResult.QualityFlag.OK,
                    "uncertainty samples", f("%d of %d prior samples solved%s", samples - failedSamples, samples,
                            bad ? "; too many failed, the ellipsoids understate the uncertainty" : "")));
        } else {
            flags.add(new PlanResult.QualityFlag(PlanResult.QualityFlag.WARNING, "uncertainty",
                    "no prior samples were requested: positions are given without ellipsoids"));
        }
    }

    /**
     * Similarity and folding of a registration; {@code fromMechanics}: it started from the mechanics
     * field, whose own folding is then told apart from the residual registration's;
     * {@code inBody}: det J statistics over the body voxels of the fixed image (null if unknown).
     */
    static void registration(List<PlanResult.QualityFlag> flags, String what, RegistrationResult r,
                             boolean fromMechanics, JacobianStats inBody) {
        double change = r.costInitial() == 0 ? 0 : (r.costFinal() - r.costInitial()) / Math.abs(r.costInitial()) * 100;
        flags.add(new PlanResult.QualityFlag(r.improved() ? PlanResult.QualityFlag.OK : PlanResult.QualityFlag.WARNING,
                what + " similarity", f("%s cost %.4g before, %.4g after (%+.1f %%, lower is better)%s",
                        r.metric(), r.costInitial(), r.costFinal(), change,
                        r.improved() ? "" : "; the registration could not improve on its start")));
        flags.add(folding(what, r.jacobian(), inBody, fromMechanics ? r.residualJacobian() : null));
    }

    /**
     * Folding of a registration's map. Tissue folds when det J ≤ 0 inside the body ({@code inBody});
     * folds only in the air around it (where the fields are extrapolated) do not move tissue and are
     * reported without alarm. When the map started from the mechanics field ({@code residual} not
     * null) the residual part's own statistics tell which part folds. Without body statistics any
     * fold counts as tissue.
     */
    static PlanResult.QualityFlag folding(String what, JacobianStats total, JacobianStats inBody,
                                          JacobianStats residual) {
        boolean foldsAnywhere = total.percentNonPositive() > 0;
        boolean foldsTissue = inBody == null ? foldsAnywhere : inBody.percentNonPositive() > 0;
        String text = inBody == null ? "" : f("inside the body: Jacobian determinant min %.3f, %.3f %% of voxels ≤ 0; ",
                inBody.minDet(), inBody.percentNonPositive());
        text += f("whole grid: Jacobian determinant min %.3f, %.3f %% of voxels ≤ 0, SD of log det J %.3f",
                total.minDet(), total.percentNonPositive(), total.sdLogDet());
        if (residual != null) {
            text += f("; the residual registration alone: min %.3f, %.3f %% ≤ 0", residual.minDet(),
                    residual.percentNonPositive());
        }
        if (foldsTissue) {
            text += residual != null && residual.percentNonPositive() == 0
                    ? ": the map folds tissue where its mechanics start folds (the residual registration does not)"
                    : ": the map folds tissue";
        } else if (foldsAnywhere) {
            text += ": it folds only in the air outside the body, which moves no tissue";
        }
        return new PlanResult.QualityFlag(foldsTissue ? PlanResult.QualityFlag.PROBLEM : PlanResult.QualityFlag.OK,
                what + " folding", text);
    }

    /**
     * Mechanics-only vs hybrid (both in the supine frame): the two disagree beyond their ellipsoids
     * when the hybrid position lies outside the mechanics 95 % ellipsoid and vice versa.
     */
    static void disagreement(List<PlanResult.QualityFlag> flags, List<PlanResult.LesionResult> lesions) {
        for (PlanResult.LesionResult l : lesions) {
            PlanResult.Prediction m = null;
            PlanResult.Prediction h = null;
            PlanResult.Prediction r = null;
            for (PlanResult.Prediction p : l.predictions()) {
                if (PlanResult.FRAME_SUPINE.equals(p.frame()) && PlanResult.MECHANICS.equals(p.method())) {
                    m = p;
                } else if (PlanResult.HYBRID.equals(p.method())) {
                    h = p;
                } else if (PlanResult.REGISTRATION.equals(p.method())) {
                    r = p;
                }
            }
            if (h != null && r != null) {
                registrationSpread(flags, l.id(), h, r);
            }
            if (m == null || h == null) {
                continue;
            }
            double[] a = m.positionRasMm();
            double[] b = h.positionRasMm();
            double d = Math.sqrt((a[0] - b[0]) * (a[0] - b[0]) + (a[1] - b[1]) * (a[1] - b[1])
                    + (a[2] - b[2]) * (a[2] - b[2]));
            if (m.covarianceMm2() == null || h.covarianceMm2() == null) {
                flags.add(new PlanResult.QualityFlag(PlanResult.QualityFlag.OK, "method agreement",
                        f("lesion %s: mechanics-only and hybrid differ by %.1f mm (no ellipsoids to compare)", l.id(), d)));
                continue;
            }
            org.turnmark.app.uncertainty.Ellipsoid em = org.turnmark.app.uncertainty.Ellipsoid.of(a, m.covarianceMm2(), 0.95);
            org.turnmark.app.uncertainty.Ellipsoid eh = org.turnmark.app.uncertainty.Ellipsoid.of(b, h.covarianceMm2(), 0.95);
            boolean apart = !em.contains(b) && !eh.contains(a);
            flags.add(new PlanResult.QualityFlag(apart ? PlanResult.QualityFlag.WARNING : PlanResult.QualityFlag.OK,
                    "method agreement", f("lesion %s: mechanics-only and hybrid differ by %.1f mm; %s", l.id(), d,
                            apart ? "each lies outside the other's 95 % ellipsoid: the methods disagree beyond their "
                                    + "stated uncertainty, review the images"
                                    : "within the 95 % ellipsoids")));
        }
    }

    /**
     * Hybrid vs registration-only: the same registration from the mechanics start and from a rigid start.
     * Where they end far apart, at least one settled on other tissue; the flag warns when the
     * registration-only position lies outside the hybrid's 95 % ellipsoid.
     */
    static void registrationSpread(List<PlanResult.QualityFlag> flags, String lesionId, PlanResult.Prediction hybrid,
                                   PlanResult.Prediction registrationOnly) {
        double[] a = hybrid.positionRasMm();
        double[] b = registrationOnly.positionRasMm();
        double d = Math.sqrt((a[0] - b[0]) * (a[0] - b[0]) + (a[1] - b[1]) * (a[1] - b[1])
                + (a[2] - b[2]) * (a[2] - b[2]));
        boolean outside = hybrid.covarianceMm2() != null
                && !org.turnmark.app.uncertainty.Ellipsoid.of(a, hybrid.covarianceMm2(), 0.95).contains(b);
        flags.add(new PlanResult.QualityFlag(outside ? PlanResult.QualityFlag.WARNING : PlanResult.QualityFlag.OK,
                "registration agreement", f("lesion %s: hybrid and registration-only differ by %.1f mm; %s", lesionId, d,
                        hybrid.covarianceMm2() == null ? "(no hybrid ellipsoid to compare)"
                                : outside ? "the registration-only position lies outside the hybrid 95 % ellipsoid: "
                                + "the registration found different tissue from its two starts, review the images"
                                : "within the hybrid 95 % ellipsoid")));
    }
}
