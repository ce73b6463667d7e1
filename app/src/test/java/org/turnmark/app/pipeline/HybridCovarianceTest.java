package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;

import org.junit.jupiter.api.Test;

class HybridCovarianceTest {

    /** Sums of exactly representable binary fractions: exact in double precision. */
    private static final double EXACT = 0.0;

    @Test
    void hybridCovarianceIsTheWeightedSumOfItsTerms() {
        double[] marking = {2, 0.5, 0, 0.5, 2, 0, 0, 0, 2};
        double[] mechanics = {40, 3, 1, 3, 5, 0, 1, 0, 4};
        // Label-refined centroid: no marking term; 1.25² I + 0.125 M, by hand.
        assertArrayEquals(new double[] {6.5625, 0.375, 0.125, 0.375, 2.1875, 0, 0.125, 0, 2.0625},
                Planner.covariance(new PlanResult.CovarianceTerms(marking, 0, 1.25, mechanics, 0.125)), EXACT);
        // Centroid as marked: the marking term is added in full.
        assertArrayEquals(new double[] {8.5625, 0.875, 0.125, 0.875, 4.1875, 0, 0.125, 0, 4.0625},
                Planner.covariance(new PlanResult.CovarianceTerms(marking, 1, 1.25, mechanics, 0.125)), EXACT);
    }
}
