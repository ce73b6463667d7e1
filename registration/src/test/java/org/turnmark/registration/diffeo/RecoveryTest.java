package org.turnmark.registration.diffeo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.registration.metric.MetricKind;
import org.turnmark.registration.transform.DisplacementFields;
import org.turnmark.registration.transform.VelocityFields;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Recovery of a known smooth deformation between invented MR-like volumes (ground truth: the analytic
 * flow of {@link SyntheticPair}, integrated by RK4).
 */
class RecoveryTest {

    /** Finest voxel size of the recovery tests (mm). */
    private static final double VOXEL_MM = 2.0;
    /**
     * "Well below the voxel size": half a voxel. Sub-voxel accuracy is what intensity registration
     * of well-textured images reaches (common practice); a missing or wrong force term leaves errors of
     * the order of the deformation itself (≈ 2.7 mm here).
     */
    private static final double MAX_MEAN_ENDPOINT_ERROR_MM = 0.5 * VOXEL_MM;
    /** "Error drops substantially": at most 40 % of the initial mean error remains. */
    private static final double MAX_REMAINING_FRACTION = 0.4;

    /**
     * Mutual information is a global statistic of the joint histogram and pins local detail less
     * tightly than a local measure (common practice): it must at least halve the error.
     */
    private static final double MI_REMAINING_FRACTION = 0.5;

    private static final SyntheticPair PAIR = new SyntheticPair(5, 3.0);
    private static final Grid3 FIXED_GRID = SyntheticPair.centred(40, 40, 32, VOXEL_MM);

    private static RegistrationConfig testConfig(MetricKind metric) {
        return RegistrationConfig.defaults().withMetric(metric).withIterations(30, 40).withMaxStepMm(0.5)
                .withConvergence(5, 1e-6);
    }

    @Test
    void lnccRecoversSmoothDeformationFromMovingOnAnotherGrid() {
        // The moving image lives on a rotated grid with other spacing: sampled through world coordinates.
        Grid3 movingGrid = new Grid3(46, 44, 30, Affine3D.translation(-40, -38, -33)
                .compose(Affine3D.rotation(0.2, 0.1, 1, Math.toRadians(6)))
                .compose(Affine3D.scaling(1.8, 1.8, 2.3)));
        Volume fixed = PAIR.fixed(FIXED_GRID);
        Volume moving = PAIR.moving(movingGrid, false);
        Volume mask = SyntheticPair.mask(FIXED_GRID);
        VectorField truth = PAIR.trueDisplacement(FIXED_GRID);
        RegistrationResult r = new DiffeomorphicRegistration(testConfig(MetricKind.LNCC))
                .register(new RegistrationInput(fixed, moving, mask, null, null, "fixed", "moving"), Progress.NONE);
        double before = SyntheticPair.meanDistance(truth, null, mask);
        double after = SyntheticPair.meanDistance(truth, r.displacement(), mask);
        assertTrue(before > 2.0, "sanity: the deformation must be larger than a voxel, mean " + before + " mm");
        assertTrue(after < MAX_MEAN_ENDPOINT_ERROR_MM, "mean endpoint error " + after + " mm");
        assertTrue(after < MAX_REMAINING_FRACTION * before, "error " + after + " mm vs initial " + before + " mm");
        assertTrue(r.jacobian().minDet() > 0, "folding: min det J " + r.jacobian().minDet());
        assertTrue(r.improved());
        assertTrue(r.costFinal() < r.costInitial());
        assertEquals(2, r.levels().size());
    }

    @Test
    void residualModeRefinesPerturbedInitialField() {
        // Initial field = truth + a smooth 2 mm perturbation (a stand-in for a mechanics prediction).
        Volume fixed = PAIR.fixed(FIXED_GRID);
        Volume moving = PAIR.moving(FIXED_GRID, false);
        Volume mask = SyntheticPair.mask(FIXED_GRID);
        VectorField truth = PAIR.trueDisplacement(FIXED_GRID);
        VectorField initial = truth.copy();
        for (int k = 0; k < FIXED_GRID.nz(); k++) {
            for (int j = 0; j < FIXED_GRID.ny(); j++) {
                for (int i = 0; i < FIXED_GRID.nx(); i++) {
                    double[] p = FIXED_GRID.worldOf(i, j, k);
                    int n = FIXED_GRID.index(i, j, k);
                    initial.x()[n] += (float) (2.0 * Math.cos(2 * Math.PI * p[2] / 80));
                    initial.y()[n] += (float) (-1.5 * Math.sin(2 * Math.PI * p[0] / 90));
                    initial.z()[n] += (float) 1.0;
                }
            }
        }
        RegistrationResult r = new DiffeomorphicRegistration(testConfig(MetricKind.SSD))
                .register(new RegistrationInput(fixed, moving, mask, null, initial, "fixed", "moving"), Progress.NONE);
        double before = SyntheticPair.meanDistance(truth, initial, mask);
        double after = SyntheticPair.meanDistance(truth, r.displacement(), mask);
        assertTrue(before > 1.5, "sanity: perturbation larger than most of a voxel, mean " + before + " mm");
        assertTrue(after < MAX_MEAN_ENDPOINT_ERROR_MM, "mean endpoint error " + after + " mm");
        assertTrue(after < MAX_REMAINING_FRACTION * before, "error " + after + " mm vs initial " + before + " mm");
        assertTrue(r.residualJacobian().minDet() > 0, "residual folds: " + r.residualJacobian());
        // Stated convention: total = initial ∘ exp(v).
        VectorField expected = DisplacementFields.compose(initial, VelocityFields.exp(r.velocity()));
        assertEquals(0.0, SyntheticPair.meanDistance(expected, r.displacement(), mask), 1e-6);
    }

    @Test
    void mutualInformationRecoversDeformationAcrossContrasts() {
        // Moving contrast inverted (300 − 2T): SSD/LNCC-with-sign would not apply, MI must.
        Grid3 g = SyntheticPair.centred(32, 32, 26, 2.5);
        Volume fixed = PAIR.fixed(g);
        Volume moving = PAIR.moving(g, true);
        Volume mask = SyntheticPair.mask(g);
        VectorField truth = PAIR.trueDisplacement(g);
        RegistrationResult r = new DiffeomorphicRegistration(testConfig(MetricKind.MI).withMiBins(32))
                .register(new RegistrationInput(fixed, moving, mask, null, null, "fixed", "moving"), Progress.NONE);
        double before = SyntheticPair.meanDistance(truth, null, mask);
        double after = SyntheticPair.meanDistance(truth, r.displacement(), mask);
        assertTrue(after < MI_REMAINING_FRACTION * before, "error " + after + " mm vs initial " + before + " mm");
        assertTrue(r.jacobian().minDet() > 0);
    }

    @Test
    void symmetricVariantRecoversDeformation() {
        Grid3 g = SyntheticPair.centred(32, 32, 26, 2.5);
        Volume fixed = PAIR.fixed(g);
        Volume moving = PAIR.moving(g, false);
        Volume mask = SyntheticPair.mask(g);
        VectorField truth = PAIR.trueDisplacement(g);
        RegistrationResult r = new DiffeomorphicRegistration(testConfig(MetricKind.SSD).withSymmetric(true))
                .register(new RegistrationInput(fixed, moving, mask, null, null, "fixed", "moving"), Progress.NONE);
        double before = SyntheticPair.meanDistance(truth, null, mask);
        double after = SyntheticPair.meanDistance(truth, r.displacement(), mask);
        assertTrue(after < 0.5 * 2.5, "mean endpoint error " + after + " mm (voxel 2.5 mm)");
        assertTrue(after < MAX_REMAINING_FRACTION * before, "error " + after + " mm vs initial " + before + " mm");
        assertTrue(r.jacobian().minDet() > 0);
    }
}
