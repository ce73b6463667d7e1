package org.turnmark.app.export;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.app.pipeline.Descriptors;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.app.uncertainty.Sensitivity;
import org.turnmark.geom.ResearchUse;

/** A small synthetic plan (invented numbers) for export tests. */
final class PlanFixtures {

    private PlanFixtures() {
    }

    static PlanResult plan() {
        return plan(30.25);
    }

    /** The plan with the given depth from the chest wall (mm; null: the model has no chest-wall surface). */
    static PlanResult plan(Double depthFromChestWallMm) {
        CaseFile input = new CaseFile(1, "fixture, \"quoted\"", "invented", "/tmp/prone.nii.gz", null, null, "left",
                List.of(new CaseFile.LesionMark("L1", "left", new double[] {-60, 80, 10}, null, 5.0, null, null)),
                List.of(new CaseFile.NippleMark("left", new double[] {-80, 120, 0})), null,
                new CaseFile.ModelOptions(6.0, "sliding", 9.80665), null, new CaseFile.UncertaintyOptions(12, "sobol", 1L),
                null, null, null);
        Descriptors.Descriptor prone = Descriptors.compute("left", new double[] {-60, 80, 10},
                new double[] {-80, 120, 0}, new double[] {-80, 40, 0}, 12.5, depthFromChestWallMm);
        double[] cov = {9, 1, 0, 1, 4, 0, 0, 0, 1};
        Ellipsoid e95 = Ellipsoid.of(new double[] {-65, 50, 20}, cov, 0.95);
        Ellipsoid e68 = Ellipsoid.of(new double[] {-65, 50, 20}, cov, 0.6827);
        Sensitivity.Ranking rank = new Sensitivity.Ranking(List.of(
                new Sensitivity.Effect("mu_fat", 3.5, new double[] {1, 2, 2.5}),
                new Sensitivity.Effect("nu", 0.5, new double[] {0.1, 0.2, 0.3})), "multiple linear regression", 0.9);
        PlanResult.Prediction mech = new PlanResult.Prediction(PlanResult.MECHANICS, PlanResult.FRAME_PRONE,
                new double[] {-65, 50, 20}, new double[] {-5, -30, 10}, cov, PlanResult.EllipsoidSummary.of(e68),
                PlanResult.EllipsoidSummary.of(e95), prone, rank, 7.25);
        PlanResult.Prediction hyb = new PlanResult.Prediction(PlanResult.HYBRID, PlanResult.FRAME_SUPINE,
                new double[] {-66, 49, 21}, new double[] {-6, -31, 11}, null, null, null, null, null, null);
        PlanResult.LesionResult l = new PlanResult.LesionResult("L1", "left", new double[] {-60, 80, 10},
                new double[] {-60.5, 80.25, 10}, "none", prone, List.of(mech, hyb),
                List.of(new PlanResult.InverseMapping(PlanResult.MECHANICS, new double[] {1, 2, 3}, new double[] {4, 5, 6})));
        Map<String, Double> stages = new LinkedHashMap<>();
        stages.put("mesh", 1.5);
        stages.put("reference state", 10.0);
        Map<String, Map<String, Double>> mats = new LinkedHashMap<>();
        mats.put("fat", Map.of("mu_kpa", 0.3, "nu", 0.49, "density_kg_m3", 911.0));
        PlanResult.ModelSummary model = new PlanResult.ModelSummary(6, 1000, 1300, 200, 40, "sliding", mats,
                Map.of("supine reload", new PlanResult.SolveSummary(true, 8, 30, 0.42, 1e-9, 40.5, 2.5)));
        return new PlanResult(ResearchUse.FULL, Map.of("turnmark", "test"), "2026-01-01T00:00:00Z", input,
                Map.of("prone_image", "00ff"), stages, model,
                new PlanResult.UncertaintySummary(12, 12, "sobol", 1, List.of("mu_fat", "nu"), List.of("lesion marking")),
                new PlanResult.RigidAlignment("fixture alignment", new double[] {1, 0, 0, 1.5, 0, 1, 0, -2, 0, 0, 1, 0.25,
                    0, 0, 0, 1}, 0, new double[] {1.5, -2, 0.25}),
                List.of(l), List.of(new PlanResult.QualityFlag(PlanResult.QualityFlag.OK, "convergence", "all solves converged")),
                List.of("nipple detected automatically"));
    }
}
