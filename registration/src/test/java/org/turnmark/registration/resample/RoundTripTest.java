package org.turnmark.registration.resample;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.Volume;

class RoundTripTest {

    /** Width of the Gaussian blob, mm (grid spacing 1 mm). */
    private static final double BLOB_SIGMA_MM = 5.0;

    /**
     * Trilinear interpolation error ≤ (h²/8) Σ_a max|∂²f/∂x_a²| (tensor-product linear interpolation,
     * closed form). For exp(-r²/(2s²)), max|∂²f/∂x²| = 1/s² = 0.04 mm⁻², h = 1 mm: 3 × 0.04 / 8 =
     * 0.015 per resampling; a forward-then-inverse round trip is bounded by twice that.
     */
    private static final double LINEAR_ROUND_TRIP_BOUND = 2 * 3 * (1.0 / (BLOB_SIGMA_MM * BLOB_SIGMA_MM)) / 8;

    /**
     * Cubic spline interpolation error ≤ (5/384) h⁴ max|f⁗| per axis (Hall and Meyer, J Approx
     * Theory 16, 1976); max|f⁗| = 3/s⁴ = 0.0048 mm⁻⁴: 6.2e-5 per axis, 1.9e-4 per resampling, 3.8e-4
     * for the round trip (the mirror boundary is 3σ away from the checked region).
     */
    private static final double CUBIC_ROUND_TRIP_BOUND = 2 * 3 * 5.0 / 384 * 3 / Math.pow(BLOB_SIGMA_MM, 4);

    /** Centre-of-FOV and spacing arithmetic in double on 40-voxel grids: round-off ~1e-13 mm. */
    private static final double GRID_TOLERANCE_MM = 1e-9;

    /**
     * Field components O(10 mm) stored as float (2^-24 relative, ~1e-6 mm) and interpolated from
     * float corners: 1e-5 mm leaves a 10× margin.
     */
    private static final double FIELD_FLOAT_TOLERANCE_MM = 1e-5;

    private static Volume blob(Grid3 g, double[] centre) {
        float[] d = new float[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] w = g.worldOf(i, j, k);
                    double r2 = sq(w[0] - centre[0]) + sq(w[1] - centre[1]) + sq(w[2] - centre[2]);
                    d[g.index(i, j, k)] = (float) Math.exp(-r2 / (2 * BLOB_SIGMA_MM * BLOB_SIGMA_MM));
                }
            }
        }
        return new Volume(g, d);
    }

    private static double sq(double v) {
        return v * v;
    }

    @Test
    void affineForwardThenInverseReproducesSmoothImageWithinInterpolationBounds() {
        Grid3 g = Grid3.axisAligned(33, 31, 29, 1, 1, 1, -16, -15, -14);
        double[] c = {0.3, -0.4, 0.2};
        Volume f = blob(g, c);
        Affine3D a = Affine3D.translation(1.3, -0.7, 0.45).compose(Affine3D.rotation(1, 2, 3, Math.toRadians(12)));
        double[] errors = new double[2];
        Interp[] kinds = {Interp.LINEAR, Interp.CUBIC_BSPLINE};
        for (int t = 0; t < 2; t++) {
            Volume forward = Resampler.resample(f, g, a, null, kinds[t], Outside.CONSTANT);
            Volume back = Resampler.resample(forward, g, a.inverse(), null, kinds[t], Outside.CONSTANT);
            double max = 0;
            for (int k = 0; k < g.nz(); k++) {
                for (int j = 0; j < g.ny(); j++) {
                    for (int i = 0; i < g.nx(); i++) {
                        double[] w = g.worldOf(i, j, k);
                        if (sq(w[0] - c[0]) + sq(w[1] - c[1]) + sq(w[2] - c[2]) < sq(2 * BLOB_SIGMA_MM)) {
                            max = Math.max(max, Math.abs(back.get(i, j, k) - f.get(i, j, k)));
                        }
                    }
                }
            }
            errors[t] = max;
        }
        assertTrue(errors[0] <= LINEAR_ROUND_TRIP_BOUND, "linear round trip error " + errors[0]);
        assertTrue(errors[1] <= CUBIC_ROUND_TRIP_BOUND, "cubic round trip error " + errors[1]);
        assertTrue(errors[0] > 10 * errors[1], "cubic must be much more accurate than linear on a smooth image: "
                + errors[0] + " vs " + errors[1]);
    }

    @Test
    void isotropicCoveringGridKeepsCentreDirectionsAndFieldOfView() {
        Affine3D rot = Affine3D.rotation(0.2, 1, -0.4, 0.5);
        Grid3 g = new Grid3(40, 30, 20, Affine3D.translation(5, -7, 12).compose(rot).compose(Affine3D.scaling(0.7, 0.7, 1.6)));
        Grid3 iso = Grids.isotropicCovering(g, 1.0);
        assertEquals(28, iso.nx()); // round(40 * 0.7)
        assertEquals(21, iso.ny()); // round(30 * 0.7)
        assertEquals(32, iso.nz()); // round(20 * 1.6)
        assertArrayEquals(Grids.centreMm(g), Grids.centreMm(iso), GRID_TOLERANCE_MM);
        for (int axis = 0; axis < 3; axis++) {
            assertEquals(1.0, iso.spacingMm(axis), GRID_TOLERANCE_MM);
        }
        double[] r = rot.toRowMajor();
        double[] m = iso.voxelToWorld().toRowMajor();
        for (int e : new int[] {0, 1, 2, 4, 5, 6, 8, 9, 10}) {
            assertEquals(r[e], m[e], GRID_TOLERANCE_MM, "direction entry " + e);
        }
    }

    @Test
    void rotatedGridKeepsCentreAndSpacingAndResamplingOntoItPreservesTheBlob() {
        Grid3 g = Grid3.axisAligned(33, 31, 29, 1, 1, 1, -16, -15, -14);
        Grid3 rg = Grids.rotatedAboutCentre(g, 1, 1, 0, Math.toRadians(20));
        assertArrayEquals(Grids.centreMm(g), Grids.centreMm(rg), GRID_TOLERANCE_MM);
        assertEquals(1.0, rg.spacingMm(2), GRID_TOLERANCE_MM);
        double[] c = {0.3, -0.4, 0.2};
        Volume onRotated = Resampler.resample(blob(g, c), rg, null, null, Interp.LINEAR, Outside.CONSTANT);
        Volume exact = blob(rg, c);
        double max = 0;
        for (int q = 0; q < rg.size(); q++) {
            double[] w = rg.worldOf(q % rg.nx(), (q / rg.nx()) % rg.ny(), q / (rg.nx() * rg.ny()));
            // Compare where the blob matters and the sample lies well inside the source grid.
            if (sq(w[0] - c[0]) + sq(w[1] - c[1]) + sq(w[2] - c[2]) < sq(2 * BLOB_SIGMA_MM)) {
                max = Math.max(max, Math.abs(onRotated.data()[q] - exact.data()[q]));
            }
        }
        assertTrue(max <= LINEAR_ROUND_TRIP_BOUND / 2, "single trilinear resampling error " + max);
    }

    @Test
    void rescaledGridHalvesDimensionsAndResampledLinearFieldIsExact() {
        Grid3 g = new Grid3(40, 31, 20, Affine3D.translation(3, -2, 7).compose(Affine3D.rotation(0, 0, 1, 0.3))
                .compose(Affine3D.scaling(0.8, 0.8, 1.5)));
        Grid3 coarse = Grids.rescaled(g, 2.0);
        assertEquals(20, coarse.nx());
        assertEquals(16, coarse.ny()); // round(15.5) = 16 (Math.round rounds halves up)
        assertEquals(10, coarse.nz());
        assertEquals(3.0, coarse.spacingMm(2), GRID_TOLERANCE_MM);
        assertArrayEquals(Grids.centreMm(g), Grids.centreMm(coarse), GRID_TOLERANCE_MM);
        // A field linear in world position is reproduced exactly by trilinear interpolation
        // (closed form) wherever the coarse centres lie inside the fine grid.
        org.turnmark.registration.volume.VectorField u = org.turnmark.registration.volume.VectorField.zeros(coarse);
        for (int q = 0; q < coarse.size(); q++) {
            double[] w = coarse.worldOf(q % 20, (q / 20) % 16, q / 320);
            u.x()[q] = (float) (0.1 * w[0] - 0.05 * w[2]);
            u.y()[q] = (float) (0.02 * w[1] + 1);
            u.z()[q] = (float) (-0.03 * w[0]);
        }
        org.turnmark.registration.volume.VectorField fine = Resampler.resample(u, g, Interp.LINEAR, Outside.CLAMP);
        int checked = 0;
        for (int q = 0; q < g.size(); q++) {
            double[] w = g.worldOf(q % 40, (q / 40) % 31, q / (40 * 31));
            double[] v = coarse.worldToVoxel().applyPoint(w[0], w[1], w[2]);
            if (v[0] >= 0 && v[1] >= 0 && v[2] >= 0 && v[0] <= 19 && v[1] <= 15 && v[2] <= 9) {
                assertEquals(0.1 * w[0] - 0.05 * w[2], fine.x()[q], FIELD_FLOAT_TOLERANCE_MM);
                assertEquals(0.02 * w[1] + 1, fine.y()[q], FIELD_FLOAT_TOLERANCE_MM);
                assertEquals(-0.03 * w[0], fine.z()[q], FIELD_FLOAT_TOLERANCE_MM);
                checked++;
            }
        }
        assertTrue(checked > g.size() / 3, "most fine voxels must be checked, got " + checked);
    }
}
