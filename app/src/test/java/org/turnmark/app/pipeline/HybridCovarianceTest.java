package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;

import org.junit.jupiter.api.Test;

class HybridCovarianceTest {

    /** Sums and products of exactly representable binary fractions: exact in double precision. */
    private static final double EXACT = 0.0;

    @Test
    void hybridCovarianceIsTheWeightedSumOfItsTerms() {
        double[] marking = {2, 0.5, 0, 0.5, 2, 0, 0, 0, 2};
        // Spread ρ = (3, 0, 0) mm: |ρ|² / 3 = 3 mm²; weight 0.25 → 0.75 mm²; 1.25² = 1.5625 mm².
        double[] spread = {3, 0, 0};
        // Label-refined centroid: no marking term; (1.5625 + 0.75) I, by hand.
        assertArrayEquals(new double[] {2.3125, 0, 0, 0, 2.3125, 0, 0, 0, 2.3125},
                Planner.covariance(new PlanResult.CovarianceTerms(marking, 0, 1.25, spread, 0.25)), EXACT);
        // Centroid as marked: the marking term is added in full.
        assertArrayEquals(new double[] {4.3125, 0.5, 0, 0.5, 4.3125, 0, 0, 0, 4.3125},
                Planner.covariance(new PlanResult.CovarianceTerms(marking, 1, 1.25, spread, 0.25)), EXACT);
    }
}
