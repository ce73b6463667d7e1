package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;

import org.junit.jupiter.api.Test;

class HybridCovarianceTest {

    /** Sums and products of exactly representable binary fractions: exact in double precision. */
    private static final double EXACT = 0.0;

    @Test
    void hybridCovarianceIsTheWeightedSumOfItsTerms() {
        double[] marking = {2, 0.5, 0, 0.5, 2, 0, 0, 0, 2};
        // Mechanics-only covariance (supine frame), elongated along x; weight 0.25 → {3, 0.25, 0, 0.25, 1, 0,
        // 0, 0, 0.5} mm²; 1.25² = 1.5625 mm² on the diagonal.
        double[] mechanics = {12, 1, 0, 1, 4, 0, 0, 0, 2};
        // Label-refined centroid: no marking term; by hand: 1.5625 I + 0.25 × mechanics.
        assertArrayEquals(new double[] {4.5625, 0.25, 0, 0.25, 2.5625, 0, 0, 0, 2.0625},
                Planner.covariance(new PlanResult.CovarianceTerms(marking, 0, 1.25, mechanics, 0.25)), EXACT);
        // Centroid as marked: the marking term is added in full.
        assertArrayEquals(new double[] {6.5625, 0.75, 0, 0.75, 4.5625, 0, 0, 0, 4.0625},
                Planner.covariance(new PlanResult.CovarianceTerms(marking, 1, 1.25, mechanics, 0.25)), EXACT);
    }
}
