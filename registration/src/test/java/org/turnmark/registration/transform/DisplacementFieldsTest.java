package org.turnmark.registration.transform;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;

class DisplacementFieldsTest {

    /** Trilinear interpolation reproduces affine fields exactly; float storage of ≤ 50 mm values. */
    private static final double AFFINE_TOL_MM = 1e-4;

    @Test
    void composeMatchesPointwiseApplicationOnObliqueGrids() {
        // Naive reference: apply inner then outer point by point with applyToPoint.
        Grid3 gi = TestFields.oblique(11, 9, 7);
        Grid3 go = Grid3.axisAligned(13, 12, 10, 1.2, 1.1, 1.5, -20, 20, -15);
        VectorField inner = TestFields.sample(TestFields.sine(2, 20, 0.1), gi);
        VectorField outer = TestFields.sample(TestFields.cosine(3, 17), go);
        VectorField c = DisplacementFields.compose(outer, inner);
        double[] q = new double[3];
        double max = 0;
        for (int k = 0; k < gi.nz(); k++) {
            for (int j = 0; j < gi.ny(); j++) {
                for (int i = 0; i < gi.nx(); i++) {
                    double[] p = gi.worldOf(i, j, k);
                    DisplacementFields.applyToPoint(inner, p, q);
                    DisplacementFields.applyToPoint(outer, q, q);
                    int n = gi.index(i, j, k);
                    max = Math.max(max, Math.abs(p[0] + c.x()[n] - q[0]));
                    max = Math.max(max, Math.abs(p[1] + c.y()[n] - q[1]));
                    max = Math.max(max, Math.abs(p[2] + c.z()[n] - q[2]));
                }
            }
        }
        assertTrue(max < AFFINE_TOL_MM, "compose differs from pointwise application by " + max + " mm");
    }

    @Test
    void composingAffineFieldsGivesTheAffineProduct() {
        // Closed form: (x ↦ Bx) ∘ (x ↦ Ax) = x ↦ BAx; trilinear interpolation is exact for affine fields,
        // checked away from the clamp region (inner map stays inside the grid there).
        Grid3 g = TestFields.oblique(12, 12, 12);
        Affine3D a = Affine3D.rotation(0, 0, 1, 0.05).compose(Affine3D.scaling(1.02, 0.98, 1.01));
        Affine3D b = Affine3D.translation(0.3, -0.2, 0.1).compose(Affine3D.rotation(1, 0, 0, -0.03));
        Affine3D center = Affine3D.translation(g.worldOf(5.5, 5.5, 5.5)[0], g.worldOf(5.5, 5.5, 5.5)[1],
                g.worldOf(5.5, 5.5, 5.5)[2]);
        Affine3D ac = center.compose(a).compose(center.inverse());
        Affine3D bc = center.compose(b).compose(center.inverse());
        VectorField c = DisplacementFields.compose(DisplacementFields.fromAffine(bc, g),
                DisplacementFields.fromAffine(ac, g));
        VectorField expected = DisplacementFields.fromAffine(bc.compose(ac), g);
        for (int k = 3; k < 9; k++) {
            for (int j = 3; j < 9; j++) {
                for (int i = 3; i < 9; i++) {
                    int n = g.index(i, j, k);
                    assertEquals(expected.x()[n], c.x()[n], AFFINE_TOL_MM);
                    assertEquals(expected.y()[n], c.y()[n], AFFINE_TOL_MM);
                    assertEquals(expected.z()[n], c.z()[n], AFFINE_TOL_MM);
                }
            }
        }
    }

    @Test
    void samplingOutsideClampsToEdgeValue() {
        // Stated policy: the field is extended by its edge values.
        Grid3 g = Grid3.axisAligned(4, 4, 4, 1, 1, 1, 0, 0, 0);
        VectorField u = DisplacementFields.fromAffine(Affine3D.translation(0, 0, 0).compose(
                Affine3D.scaling(2, 1, 1)), g);
        double[] out = new double[3];
        DisplacementFields.applyToPoint(u, new double[] {10, 1, 1}, out);
        assertEquals(10 + 3.0, out[0], AFFINE_TOL_MM, "u_x(10) must equal the edge value u_x(3) = 3");
    }

    @Test
    void nonFiniteComponentIsRejectedWithVoxel() {
        Grid3 g = Grid3.axisAligned(3, 3, 3, 1, 1, 1, 0, 0, 0);
        VectorField u = VectorField.zeros(g);
        u.y()[g.index(1, 2, 0)] = Float.NaN;
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> DisplacementFields.requireFinite(u, "initial.nii.gz"));
        assertTrue(e.getMessage().contains("initial.nii.gz") && e.getMessage().contains("(1, 2, 0)"), e.getMessage());
    }
}
