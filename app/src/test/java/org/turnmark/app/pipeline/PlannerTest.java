package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.geom.Progress;

class PlannerTest {

    @TempDir
    Path dir;

    @Test
    void mechanicsOnlyPlanWithoutSupineImage() throws IOException {
        Path c = SyntheticCase.write(dir, 2, true);
        // A nipple 30 mm inside the breast, not on the skin: planned with a warning.
        Files.writeString(c, Files.readString(c).replace("\"model\"",
                "\"nipples\": [{\"side\": \"left\", \"position_ras_mm\": [-40, 10, 0]}], \"model\""));
        Planner.Outcome o = new Planner().run(new CaseFileReader().read(c), Planner.Options.DEFAULT, Progress.NONE);
        PlanResult r = o.result();
        PlanResult.LesionResult l = r.lesions().get(0);
        assertEquals("left", l.side());
        assertEquals(1, l.predictions().size(), "mechanics-only without a supine image");
        PlanResult.Prediction m = l.predictions().get(0);
        assertEquals(PlanResult.MECHANICS, m.method());
        // Supine gravity pulls the lesion posteriorly (−y) toward the chest wall (REFERENCE §6).
        assertTrue(m.displacementMm()[1] < -1, "lesion moves posteriorly: " + m.displacementMm()[1]);
        assertNotNull(m.ellipsoid95());
        assertTrue(r.warnings().stream().anyMatch(w -> w.contains("no supine image")));
        assertTrue(r.warnings().stream().anyMatch(w -> w.contains("left nipple") && w.contains("from the skin")),
                r.warnings().toString());
    }

    /**
     * The prone-frame covariance is k Σ_m + s_p² I entry by entry: every entry scaled, s_p² on the diagonal
     * only (docs/planner.md, Uncertainty).
     */
    @Test
    void proneFrameCovarianceScalesTheSampledOneAndAddsTheIsotropicTerm() {
        CaseFile.Priors d = DefaultPriors.priors();
        CaseFile.Priors p = new CaseFile.Priors(d.fat(), d.fibroglandular(), d.skin(), d.lesion(), d.nu(),
                d.chestWallSlidingProbability(), d.gravityDirectionSdDeg(), d.lesionMarkingSdMm(), d.registrationSdMm(),
                d.mechanicsSupineSdMm(), 1.5, 2.0, 3.0);
        double[] m = {4, 1, -2, 1, 9, 0.5, -2, 0.5, 16};
        double[] c = Planner.proneCovariance(m, p, false);
        double[] expected = {2 * 4 + 2.25, 2, -4, 2, 2 * 9 + 2.25, 1, -4, 1, 2 * 16 + 2.25};
        for (int i = 0; i < 9; i++) {
            assertEquals(expected[i], c[i], 1e-12, "entry " + i);
        }
        assertEquals(4, m[0], "the sampled covariance is left as it was");
        // an image showing the chest wall across the chest takes the wide-field factor
        double[] w = Planner.proneCovariance(m, p, true);
        assertEquals(3 * 4 + 2.25, w[0], 1e-12);
        assertEquals(3 * 1, w[1], 1e-12);
        assertEquals(3.0, Planner.proneScale(p, true));
        assertEquals(2.0, Planner.proneScale(p, false));
    }

    @Test
    void lesionOutsideTheBreastIsRejected() throws IOException {
        Path c = SyntheticCase.write(dir, 0, true);
        Files.writeString(c, Files.readString(c).replace("[-30, 18, 5]", "[-30, 45, 5]").replace(", \"radius_mm\": 7", ""));
        PlanInputException e = assertThrows(PlanInputException.class,
                () -> new Planner().run(new CaseFileReader().read(c), Planner.Options.DEFAULT, Progress.NONE));
        assertTrue(e.getMessage().contains("outside the breast"), e.getMessage());
    }
}
