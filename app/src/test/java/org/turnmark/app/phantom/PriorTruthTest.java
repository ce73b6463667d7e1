package org.turnmark.app.phantom;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.app.pipeline.DefaultPriors;
import org.turnmark.app.pipeline.MechanicsModel;
import org.turnmark.app.uncertainty.PriorDesign;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.material.MaterialTable;

/**
 * {@code turnmark phantom --truth priors}: the truth conditions are the draw from the planner's
 * default priors for the phantom seed, they are what the truth solves used, the truth files record
 * them exactly, and the case is deterministic for a seed. Uses the small fixture's options (4 mm
 * voxels, 8 mm truth elements), the fastest the phantom tests use.
 */
class PriorTruthTest {

    private static final PhantomOptions OPTIONS = PhantomFixture.SMALL.withTruth(PhantomOptions.Truth.PRIORS);
    private static final int[] TISSUES = {MaterialTable.FAT, MaterialTable.FIBROGLANDULAR, MaterialTable.SKIN,
        MaterialTable.LESION};

    private static PhantomCase generated;

    private static synchronized PhantomCase priorsCase() {
        if (generated == null) {
            generated = PhantomGenerator.generate(OPTIONS, Progress.NONE);
        }
        return generated;
    }

    @Test
    void truthConditionsAreTheSeedsDrawFromThePlannersPriors() {
        PhantomCase c = priorsCase();
        TruthMechanics.Conditions k = c.conditions();
        PriorDesign.Sample draw = TruthMechanics.priorDraw(OPTIONS.seed());
        assertArrayEquals(draw.u(), k.priorDraw().u(), 0.0);
        double[] rho = DefaultPriors.densitiesKgM3();
        for (int t = 0; t < 4; t++) {
            assertEquals(draw.muKpa()[t], k.muKpa()[TISSUES[t]], 0.0, "mu of label " + TISSUES[t]);
            assertEquals(rho[t], k.densityKgM3()[TISSUES[t]], 0.0, "density of label " + TISSUES[t]);
        }
        assertEquals(draw.nu(), k.nu(), 0.0);
        assertEquals(draw.sliding(), k.chestWallSliding());
        assertEquals(1.0, k.densityScale(), 0.0);
        // Supine gravity in the body frame is the planner's turned gravity, not turned by the torso placement.
        assertArrayEquals(MechanicsModel.supineGravity(TruthMechanics.G, draw.gravityRollDeg(),
                draw.gravityPitchDeg()), k.supineGravityMs2(), 0.0);
        // The rigid placement nuisance is kept: 2°–4° about z.
        double rot = Math.abs(k.torsoRotationDeg());
        assertTrue(rot >= 2 && rot <= 4, "torso rotation " + k.torsoRotationDeg() + " deg");
        // The draw depends on the seed.
        assertNotEquals(draw.nu(), TruthMechanics.priorDraw(OPTIONS.seed() + 1).nu());
    }

    @Test
    void defaultTruthHasNoDraw() {
        assertNull(PhantomFixture.small().conditions().priorDraw());
        assertEquals(TruthMechanics.TRUTH_NU, PhantomFixture.small().conditions().nu(), 0.0);
    }

    @Test
    void truthFilesRecordTheDraw(@TempDir Path tmp) throws IOException {
        PhantomCase c = priorsCase();
        PriorDesign.Sample draw = TruthMechanics.priorDraw(OPTIONS.seed());
        Path dir = tmp.resolve("case");
        PhantomWriter.write(c, dir, "prior-case", "turnmark phantom --truth priors", false);
        JsonNode t = new ObjectMapper().readTree(dir.resolve("truth").resolve("truth.json").toFile());
        assertEquals("priors", t.get("options").get("truth").asText());
        JsonNode k = t.get("truth_conditions");
        assertEquals("priors", k.get("truth_mode").asText());
        for (int i = 0; i < 4; i++) {
            String name = MaterialTable.name(TISSUES[i]);
            // Written at full precision: the JSON value is the drawn double itself.
            assertEquals(draw.muKpa()[i], k.get("shear_modulus_kpa").get(name).asDouble(), 0.0, name);
        }
        assertEquals(draw.nu(), k.get("poisson_ratio").asDouble(), 0.0);
        assertEquals(draw.sliding() ? "sliding" : "fixed", k.get("chest_wall").asText());
        assertEquals(draw.gravityRollDeg(), k.get("gravity_roll_deg").asDouble(), 0.0);
        assertEquals(draw.gravityPitchDeg(), k.get("gravity_pitch_deg").asDouble(), 0.0);
        assertEquals(DefaultPriors.spec().slidingProbability(),
                k.get("prior").get("chest_wall_sliding_probability").asDouble(), 0.0);
        String readme = Files.readString(dir.resolve("README.md"));
        assertTrue(readme.contains("one draw from the planner's default priors"), readme);
        assertTrue(readme.contains(String.format(java.util.Locale.ROOT, "Poisson's ratio %.4f", draw.nu())), readme);
        assertTrue(readme.contains(draw.sliding() ? "Chest wall sliding" : "Chest wall fixed"), readme);
        // The planner reads the case file.
        new org.turnmark.app.pipeline.CaseFileReader().read(dir.resolve("case.json"));
    }

    @Test
    void deterministicForASeed() {
        PhantomCase a = priorsCase();
        PhantomCase b = PhantomGenerator.generate(OPTIONS, Progress.NONE);
        for (int d = 0; d < 3; d++) {
            assertArrayEquals(a.displacement()[d], b.displacement()[d], "displacement component " + d);
        }
        assertArrayEquals(a.supineImage(), b.supineImage());
        assertArrayEquals(a.lesionSupine(), b.lesionSupine(), 0.0);
        // And different from the default truth of the same anatomy (other conditions, other supine shape).
        assertFalse(java.util.Arrays.equals(a.lesionSupine(), PhantomFixture.small().lesionSupine()));
    }
}
