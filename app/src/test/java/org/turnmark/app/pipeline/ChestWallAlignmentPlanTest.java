package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.app.phantom.PhantomCase;
import org.turnmark.app.phantom.PhantomGenerator;
import org.turnmark.app.phantom.PhantomOptions;
import org.turnmark.app.phantom.PhantomWriter;
import org.turnmark.geom.Progress;

/**
 * Plans with {@code rigid_alignment "chest_wall"}: on a chest-wide phantom the chest wall's own alignment
 * carries the supine-frame predictions, and the plan says so; on an image around one breast the request
 * falls back to the whole image with a warning.
 */
class ChestWallAlignmentPlanTest {

    /** Coarse model and two samples, as in the other end-to-end plan tests, to keep the plan short. */
    static final double ELEMENT_MM = 8;
    static final int SAMPLES = 2;
    /** T⁻¹ applied to the prone-frame position reproduces the supine-frame one up to round-off (mm). */
    static final double ROUNDOFF_MM = 1e-9;

    private static CaseFile withAlignment(CaseFile c, String a) {
        return new CaseFile(c.schemaVersion(), c.caseId(), c.description(), c.proneImage(), c.supineImage(), c.labels(),
                c.laterality(), c.lesions(), c.nipples(), c.chestWallPlaneRasMm(), c.model(), c.priors(),
                c.uncertainty(), a, c.output(), c.truth());
    }

    @Test
    void onAChestWideImageTheChestWallCarriesThePredictionsAndThePlanSaysSo(@TempDir Path dir) throws Exception {
        PhantomOptions o = PhantomOptions.defaults(3).withTruth(PhantomOptions.Truth.PRIORS)
                .withFieldOfView(PhantomOptions.FieldOfView.CHEST);
        o = new PhantomOptions(o.seed(), 4.0, 1, "right", o.breastVolumeMl(), o.projection(), o.ptosis(),
                o.lesionDiameterMm(), 1, o.contrast(), o.snr(), 8.0, o.truth(), o.fieldOfView());
        PhantomCase pc = PhantomGenerator.generate(o, Progress.NONE);
        Path caseDir = dir.resolve("chest");
        PhantomWriter.write(pc, caseDir, "chest", "test", false);
        CaseFile c = withAlignment(new CaseFileReader().read(caseDir.resolve("case.json")).withElementSizeMm(ELEMENT_MM),
                CaseFile.ALIGN_CHEST_WALL);
        PlanResult r = new Planner().run(c, new Planner.Options(SAMPLES), Progress.NONE).result();
        assertEquals(SupineStage.CHEST_WALL_METHOD, r.rigidAlignment().method());
        assertTrue(r.warnings().contains(SupineStage.CHEST_WALL_WARNING), r.warnings().toString());
        assertTrue(r.warnings().contains(Planner.WIDE_FIELD_WARNING), r.warnings().toString());
        assertTrue(r.flags().stream().anyMatch(f -> f.check().equals("chest-wall alignment check")), "the check "
                + "compares with the whole-image alignment");
        // the supine-frame mechanics-only position is the prone-frame one carried by the reported alignment
        PlanResult.LesionResult l = r.lesions().get(0);
        double[] prone = find(l, PlanResult.FRAME_PRONE).positionRasMm();
        double[] supine = find(l, PlanResult.FRAME_SUPINE).positionRasMm();
        double[] m = r.rigidAlignment().proneToSupineRas();
        for (int i = 0; i < 3; i++) {
            double v = m[4 * i] * prone[0] + m[4 * i + 1] * prone[1] + m[4 * i + 2] * prone[2] + m[4 * i + 3];
            assertEquals(v, supine[i], ROUNDOFF_MM, "axis " + i);
        }
        // the chest wall's own alignment finds the torso: the phantom's rotation about z is 2–4°; this
        // alignment is within a degree of it on the chest phantoms (docs/benchmarks.md)
        assertTrue(r.rigidAlignment().rotationDeg() > 1 && r.rigidAlignment().rotationDeg() < 5,
                "rotation " + r.rigidAlignment().rotationDeg());
    }

    @Test
    void aroundOneBreastTheRequestFallsBackToTheWholeImage() throws Exception {
        CaseFile c = withAlignment(new CaseFileReader().read(HybridEndToEndTest.CASE).withElementSizeMm(ELEMENT_MM),
                CaseFile.ALIGN_CHEST_WALL);
        PlanResult r = new Planner().run(c, new Planner.Options(SAMPLES), Progress.NONE).result();
        assertEquals(SupineStage.ALIGNMENT_METHOD, r.rigidAlignment().method());
        assertTrue(r.warnings().stream().anyMatch(w -> w.contains("\"chest_wall\" was asked for")
                && w.contains("whole image was used")), r.warnings().toString());
        assertTrue(r.flags().stream().noneMatch(f -> f.check().equals("chest-wall alignment check")));
    }

    private static PlanResult.Prediction find(PlanResult.LesionResult l, String frame) {
        for (PlanResult.Prediction p : l.predictions()) {
            if (p.method().equals(PlanResult.MECHANICS) && p.frame().equals(frame)) {
                return p;
            }
        }
        throw new AssertionError("no mechanics-only prediction in " + frame);
    }
}
