package org.turnmark.registration.transform;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

class JacobiansTest {

    /**
     * Central differences are exact for affine fields; what remains is float storage of u
     * (|u| ≤ ~10 mm, relative 6e-8, divided by a 1 mm step) — 1e-5 is a generous bound.
     */
    private static final double AFFINE_TOL = 1e-5;

    private static final Grid3 GRID = TestFields.oblique(9, 8, 7);

    private static double[] range(Affine3D map) {
        Volume d = Jacobians.determinant(DisplacementFields.fromAffine(map, GRID));
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (float v : d.data()) {
            lo = Math.min(lo, v);
            hi = Math.max(hi, v);
        }
        return new double[] {lo, hi};
    }

    @Test
    void translationHasUnitDeterminant() {
        // REFERENCE §5 check value: translation → 1.
        double[] r = range(Affine3D.translation(3.5, -7, 12));
        assertEquals(1.0, r[0], AFFINE_TOL);
        assertEquals(1.0, r[1], AFFINE_TOL);
    }

    @Test
    void rotationHasUnitDeterminant() {
        // REFERENCE §5 check value: rotation → 1.
        double[] r = range(Affine3D.rotation(0.3, -1, 0.5, Math.toRadians(25)));
        assertEquals(1.0, r[0], AFFINE_TOL);
        assertEquals(1.0, r[1], AFFINE_TOL);
    }

    @Test
    void tenPercentIsotropicStretchGives1331() {
        // REFERENCE §5 check value: 10 % isotropic stretch → 1.1³ = 1.331.
        double[] r = range(Affine3D.translation(4, 5, 6).compose(Affine3D.scaling(1.1, 1.1, 1.1)));
        assertEquals(1.331, r[0], AFFINE_TOL);
        assertEquals(1.331, r[1], AFFINE_TOL);
    }

    @Test
    void mirrorGivesMinusOneAndCountsAsFolding() {
        // REFERENCE §5 check value: mirror → −1.
        Volume d = Jacobians.determinant(DisplacementFields.fromAffine(Affine3D.scaling(-1, 1, 1), GRID));
        JacobianStats s = Jacobians.summarize(d, null);
        assertEquals(-1.0, s.minDet(), AFFINE_TOL);
        assertEquals(100.0, s.percentNonPositive(), 0.0);
    }

    @Test
    void summaryInsideMaskMatchesHandCount() {
        // Half the grid (i < 4) stretched along x by 1.2 in a piecewise field built by hand; the other
        // half identity. Inside a mask that keeps only i ≤ 2 (all stretched, away from the kink at i=4)
        // every det J is 1.2 exactly (closed form), so SD of log det J is 0.
        Grid3 g = Grid3.axisAligned(9, 5, 4, 1, 1, 1, 0, 0, 0);
        VectorField u = VectorField.zeros(g);
        float[] m = new float[g.size()];
        for (int k = 0; k < 4; k++) {
            for (int j = 0; j < 5; j++) {
                for (int i = 0; i < 9; i++) {
                    int n = g.index(i, j, k);
                    u.x()[n] = (float) (0.2 * Math.min(i, 4));
                    m[n] = i <= 2 ? 1 : 0;
                }
            }
        }
        Volume d = Jacobians.determinant(u);
        JacobianStats in = Jacobians.summarize(d, new Volume(g, m));
        assertEquals(3 * 5 * 4, in.voxels());
        assertEquals(1.2, in.minDet(), AFFINE_TOL);
        assertEquals(1.2, in.maxDet(), AFFINE_TOL);
        assertEquals(0.0, in.sdLogDet(), AFFINE_TOL);
        JacobianStats all = Jacobians.summarize(d, null);
        assertTrue(all.sdLogDet() > 0.05, "whole grid mixes 1 and 1.2, so SD must be clearly > 0");
        assertEquals(0.0, all.percentNonPositive(), 0.0);
    }

    @Test
    void emptyMaskIsRejected() {
        Volume d = Jacobians.determinant(VectorField.zeros(GRID));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> Jacobians.summarize(d, Volume.zeros(GRID)));
        assertTrue(e.getMessage().contains("no voxel"));
    }
}
