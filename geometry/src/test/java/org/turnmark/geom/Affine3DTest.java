package org.turnmark.geom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.Random;

import org.junit.jupiter.api.Test;

class Affine3DTest {

    /** Round-off bound for products of a few well-conditioned 4x4 matrices with entries ~100. */
    private static final double ROUND_OFF = 1e-10;

    private static Affine3D randomAffine(Random r) {
        Affine3D rot = Affine3D.rotation(r.nextGaussian(), r.nextGaussian(), r.nextGaussian(), r.nextDouble() * 3);
        return Affine3D.translation(100 * r.nextGaussian(), 100 * r.nextGaussian(), 100 * r.nextGaussian())
                .compose(rot).compose(Affine3D.scaling(0.5 + r.nextDouble(), 0.5 + r.nextDouble(), 0.5 + r.nextDouble()));
    }

    @Test
    void inverseComposedWithItselfIsIdentity() {
        Random r = new Random(42);
        for (int n = 0; n < 50; n++) {
            Affine3D a = randomAffine(r);
            assertEquals(0, a.compose(a.inverse()).maxAbsDifference(Affine3D.identity()), ROUND_OFF);
            assertEquals(0, a.inverse().compose(a).maxAbsDifference(Affine3D.identity()), ROUND_OFF);
        }
    }

    @Test
    void composeAppliesRightOperandFirst() {
        Affine3D t = Affine3D.translation(1, 2, 3);
        Affine3D s = Affine3D.scaling(2, 2, 2);
        double[] p = t.compose(s).applyPoint(1, 1, 1);
        assertEquals(3, p[0], 0);
        assertEquals(4, p[1], 0);
        assertEquals(5, p[2], 0);
    }

    @Test
    void rotationHasUnitDeterminantAndRotatesXToY() {
        Affine3D r = Affine3D.rotation(0, 0, 1, Math.PI / 2);
        assertEquals(1, r.determinant(), ROUND_OFF);
        double[] p = r.applyPoint(1, 0, 0);
        assertEquals(0, p[0], ROUND_OFF);
        assertEquals(1, p[1], ROUND_OFF);
    }

    @Test
    void singularAffineIsRejectedOnInverse() {
        Affine3D a = Affine3D.scaling(1, 0, 1);
        assertThrows(IllegalStateException.class, a::inverse);
    }

    @Test
    void nonFiniteEntryIsRejected() {
        assertThrows(IllegalArgumentException.class, () -> Affine3D.scaling(Double.NaN, 1, 1));
    }

    @Test
    void orientationLettersFollowAxisSigns() {
        // RAS+ world: a negative x step means the i axis points Left (common practice, NIfTI/ITK usage).
        assertEquals("RAS", Affine3D.scaling(1, 1, 1).orientationLetters());
        assertEquals("LPS", Affine3D.scaling(-1, -1, 1).orientationLetters());
        assertEquals("LPI", Affine3D.scaling(-1, -1, -1).orientationLetters());
        // Axial-to-sagittal permutation: i along y (A), j along z (S), k along x (R).
        Affine3D perm = new Affine3D(0, 0, 1, 0, 1, 0, 0, 0, 0, 1, 0, 0);
        assertEquals("ASR", perm.orientationLetters());
    }

    @Test
    void entryAccessAndColumnNormsMatchTheRowMajorMatrix() {
        Affine3D a = randomAffine(new Random(11));
        double[] m = a.toRowMajor();
        for (int r = 0; r < 4; r++) {
            for (int c = 0; c < 4; c++) {
                assertEquals(m[4 * r + c], a.get(r, c), 0.0);
            }
        }
        for (int c = 0; c < 3; c++) {
            assertEquals(Math.sqrt(m[c] * m[c] + m[4 + c] * m[4 + c] + m[8 + c] * m[8 + c]), a.columnNorm(c), 0.0);
        }
    }

    @Test
    void rowMajorRoundTrip() {
        Affine3D a = randomAffine(new Random(7));
        assertEquals(a, Affine3D.fromRowMajor(a.toRowMajor()));
    }
}
