package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.turnmark.app.uncertainty.PriorDesign;

/**
 * {@link DefaultPriors} is what the planner uses for a case without a {@code priors} block: the spec
 * built from a case read from disk equals it, and it states the documented defaults
 * (docs/case-format.md).
 */
class DefaultPriorsTest {

    @Test
    void equalsThePlannersSpecForACaseWithoutPriors() {
        Path file = Path.of("..", "sample-cases", "phantom-small", "case.json");
        CaseFile c = new CaseFileReader().read(file);
        PriorDesign.Spec planner = Planner.spec(c.priors());
        PriorDesign.Spec d = DefaultPriors.spec();
        assertArrayEquals(planner.muMedianKpa(), d.muMedianKpa(), 0.0);
        assertArrayEquals(planner.muGeometricSd(), d.muGeometricSd(), 0.0);
        assertEquals(planner.nuMin(), d.nuMin(), 0.0);
        assertEquals(planner.nuMax(), d.nuMax(), 0.0);
        assertEquals(planner.slidingProbability(), d.slidingProbability(), 0.0);
        assertEquals(planner.gravitySdDeg(), d.gravitySdDeg(), 0.0);
        assertArrayEquals(Planner.densities(c.priors()), DefaultPriors.densitiesKgM3(), 0.0);
        assertEquals(c.model().gravityMS2(), DefaultPriors.gravityMs2(), 0.0);
    }

    @Test
    void statesTheDocumentedDefaults() {
        // docs/case-format.md, table "priors".
        PriorDesign.Spec d = DefaultPriors.spec();
        assertArrayEquals(new double[] {0.3, 0.4, 19, 1.6}, d.muMedianKpa(), 0.0);
        assertArrayEquals(new double[] {1.6, 1.6, 1.5, 2.0}, d.muGeometricSd(), 0.0);
        assertEquals(0.45, d.nuMin(), 0.0);
        assertEquals(0.495, d.nuMax(), 0.0);
        assertEquals(0.7, d.slidingProbability(), 0.0);
        assertEquals(3.0, d.gravitySdDeg(), 0.0);
        assertArrayEquals(new double[] {911, 1041, 1100, 1050}, DefaultPriors.densitiesKgM3(), 0.0);
    }
}
