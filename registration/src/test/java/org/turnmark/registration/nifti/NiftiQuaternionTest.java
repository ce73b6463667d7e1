package org.turnmark.registration.nifti;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;

/**
 * The qform formula against the definition in {@code nifti1.h} ("Method 2": R from the quaternion
 * (a, b, c, d), columns scaled by pixdim and the third by qfac). Expected matrices are derived by
 * hand from that definition; each case names the rotation.
 */
class NiftiQuaternionTest {

    /** Hand-derived matrices are exact; double evaluation of √½·√½ products gives ~1e-16. */
    private static final double EXACT_TOL = 1e-12;

    private static final double H = Math.sqrt(0.5);

    private static double[] linear(Affine3D a) {
        double[] m = a.toRowMajor();
        return new double[] {m[0], m[1], m[2], m[4], m[5], m[6], m[8], m[9], m[10]};
    }

    @Test
    void zeroQuaternionIsIdentityScaledByPixdim() {
        // nifti1.h: b = c = d = 0 gives a = 1 and R = I; columns scaled by pixdim 2, 3, 4.
        Affine3D a = NiftiQuaternion.toAffine(0, 0, 0, 5, 6, 7, 2, 3, 4, 1);
        assertArrayEquals(new double[] {2, 0, 0, 5, 0, 3, 0, 6, 0, 0, 4, 7, 0, 0, 0, 1}, a.toRowMajor(), EXACT_TOL);
    }

    @Test
    void ninetyDegreesAboutZ() {
        // a = cos 45°, d = sin 45°: R = [[a²−d², −2ad, 0], [2ad, a²−d², 0], [0, 0, a²+d²]] = [[0,−1,0],[1,0,0],[0,0,1]].
        Affine3D a = NiftiQuaternion.toAffine(0, 0, H, 0, 0, 0, 1, 1, 1, 1);
        assertArrayEquals(new double[] {0, -1, 0, 1, 0, 0, 0, 0, 1}, linear(a), EXACT_TOL);
    }

    @Test
    void ninetyDegreesAboutX() {
        // a = b = √½: R = [[1,0,0],[0,a²−b²,−2ab],[0,2ab,a²−b²]] = [[1,0,0],[0,0,−1],[0,1,0]].
        Affine3D a = NiftiQuaternion.toAffine(H, 0, 0, 0, 0, 0, 1, 1, 1, 1);
        assertArrayEquals(new double[] {1, 0, 0, 0, 0, -1, 0, 1, 0}, linear(a), EXACT_TOL);
    }

    @Test
    void ninetyDegreesAboutY() {
        // a = c = √½: R = [[a²−c², 0, 2ac],[0,1,0],[−2ac, 0, a²−c²]] = [[0,0,1],[0,1,0],[−1,0,0]].
        Affine3D a = NiftiQuaternion.toAffine(0, H, 0, 0, 0, 0, 1, 1, 1, 1);
        assertArrayEquals(new double[] {0, 0, 1, 0, 1, 0, -1, 0, 0}, linear(a), EXACT_TOL);
    }

    @Test
    void oneEightyAboutXHasZeroA() {
        // b = 1 gives a = 0: R = diag(1, −1, −1).
        Affine3D a = NiftiQuaternion.toAffine(1, 0, 0, 0, 0, 0, 1, 1, 1, 1);
        assertArrayEquals(new double[] {1, 0, 0, 0, -1, 0, 0, 0, -1}, linear(a), EXACT_TOL);
    }

    @Test
    void negativeQfacFlipsTheThirdColumn() {
        // nifti1.h: the k coordinate is multiplied by qfac = pixdim[0] = −1 before rotation.
        Affine3D a = NiftiQuaternion.toAffine(0, 0, H, 1, 2, 3, 2, 2, 3, -1);
        assertArrayEquals(new double[] {0, -2, 0, 1, 2, 0, 0, 2, 0, 0, -3, 3, 0, 0, 0, 1}, a.toRowMajor(), EXACT_TOL);
        assertTrue(a.determinant() < 0);
    }

    @Test
    void smallAIsZeroedAndBcdRenormalised() {
        // nifti1_io.c: 1 − (b²+c²+d²) = 4.8e-8 < 1e-7 → a = 0 and (b, c, d)/|(b, c, d)|, i.e. the
        // 180° rotation about (0.6, 0.8, 0): R = 2 n nᵀ − I.
        double b = 0.6f;
        double c = 0.79999995f;
        Affine3D a = NiftiQuaternion.toAffine(b, c, 0, 0, 0, 0, 1, 1, 1, 1);
        double n = Math.sqrt(b * b + c * c);
        double nx = b / n;
        double ny = c / n;
        double[] want = {2 * nx * nx - 1, 2 * nx * ny, 0, 2 * nx * ny, 2 * ny * ny - 1, 0, 0, 0, -1};
        assertArrayEquals(want, linear(a), EXACT_TOL);
        // Without the rule a = √(4.8e-8) = 2.2e-4 would tilt the third axis by ~4e-4.
        assertTrue(Math.abs(a.get(0, 2)) < EXACT_TOL);
    }

    @Test
    void affineToQuaternionAndBackIsIdentityForRandomRotations() {
        Random rnd = new Random(11);
        for (int t = 0; t < 500; t++) {
            Affine3D rot = Affine3D.rotation(rnd.nextGaussian(), rnd.nextGaussian(), rnd.nextGaussian(),
                    rnd.nextDouble() * 2 * Math.PI);
            double flip = t % 2 == 0 ? 1 : -1;
            Affine3D a = new Affine3D(1, 0, 0, rnd.nextGaussian() * 50, 0, 1, 0, rnd.nextGaussian() * 50,
                    0, 0, 1, rnd.nextGaussian() * 50)
                    .compose(rot).compose(Affine3D.scaling(0.5 + rnd.nextDouble(), 0.5 + rnd.nextDouble(),
                            flip * (0.5 + rnd.nextDouble())));
            NiftiQuaternion.Params q = NiftiQuaternion.fromAffine(a);
            assertEquals(flip, q.qfac());
            Affine3D back = NiftiQuaternion.toAffine(q.b(), q.c(), q.d(), q.qoffsetX(), q.qoffsetY(), q.qoffsetZ(),
                    q.dx(), q.dy(), q.dz(), q.qfac());
            assertEquals(0, a.maxAbsDifference(back), 1e-9, "round trip " + t);
        }
    }

    @Test
    void halfTurnsUseTheNonTraceBranches() {
        // Trace −1 rotations (180° about x, y, z, and about (1,1,0)) exercise the branches of
        // nifti_mat44_to_quatern that do not divide by a.
        double[][] axes = {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {1, 1, 0}};
        for (double[] ax : axes) {
            Affine3D a = Affine3D.rotation(ax[0], ax[1], ax[2], Math.PI);
            NiftiQuaternion.Params q = NiftiQuaternion.fromAffine(a);
            Affine3D back = NiftiQuaternion.toAffine(q.b(), q.c(), q.d(), 0, 0, 0, 1, 1, 1, q.qfac());
            assertEquals(0, a.maxAbsDifference(back), 1e-9);
        }
    }

    @Test
    void shearCannotBeAQform() {
        Affine3D shear = new Affine3D(1, 0.3, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0);
        assertFalse(NiftiQuaternion.hasOrthogonalColumns(shear));
        assertThrows(IllegalArgumentException.class, () -> NiftiQuaternion.fromAffine(shear));
    }
}
