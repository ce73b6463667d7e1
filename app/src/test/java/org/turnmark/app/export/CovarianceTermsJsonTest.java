package org.turnmark.app.export;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.app.pipeline.PlanResult;

class CovarianceTermsJsonTest {

    @Test
    void hybridCovarianceTermsSurviveThePlanJsonRoundTrip(@TempDir Path dir) throws Exception {
        PlanResult plan = PlanFixtures.plan();
        PlanResult.LesionResult l = plan.lesions().get(0);
        PlanResult.Prediction h = l.predictions().get(1);
        PlanResult.CovarianceTerms terms = new PlanResult.CovarianceTerms(new double[] {2, 0, 0, 0, 2, 0, 0, 0, 2}, 0,
                1.25, new double[] {4, 0.5, 0, 0.5, 1, 0, 0, 0, 0.25}, 0.25);
        PlanResult.Prediction withTerms = new PlanResult.Prediction(h.method(), h.frame(), h.positionRasMm(),
                h.displacementMm(), new double[] {2.3125, 0, 0, 0, 2.3125, 0, 0, 0, 2.3125}, null, null, null,
                null, 1.5, terms);
        PlanResult.LesionResult l2 = new PlanResult.LesionResult(l.id(), l.side(), l.markedProneRasMm(),
                l.proneRasMm(), l.refinement(), l.proneDescriptors(), List.of(l.predictions().get(0), withTerms),
                l.supineMarkToProne());
        PlanResult p2 = new PlanResult(plan.caution(), plan.software(), plan.createdUtc(), plan.input(),
                plan.inputSha256(), plan.stageSeconds(), plan.model(), plan.uncertainty(), List.of(l2), plan.flags(),
                plan.warnings());
        Path f = dir.resolve("plan.json");
        PlanJson.write(p2, f);
        assertTrue(Files.readString(f).contains("\"covariance_terms\""));
        PlanResult back = PlanJson.read(f);
        assertEquals(PlanJson.toJson(p2), PlanJson.toJson(back));
        PlanResult.CovarianceTerms t = back.lesions().get(0).predictions().get(1).covarianceTerms();
        assertArrayEquals(terms.markingMm2(), t.markingMm2(), 0.0);
        assertArrayEquals(terms.mechanicsMm2(), t.mechanicsMm2(), 0.0);
        assertEquals(1.25, t.registrationSdMm(), 0.0);
        assertEquals(0.25, t.mechanicsWeight(), 0.0);
        assertEquals(0, t.markingWeight(), 0.0);
        // A prediction without terms writes none and reads back as null.
        assertNull(back.lesions().get(0).predictions().get(0).covarianceTerms());
    }
}
