package org.turnmark.mechanics.element;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;
import org.junit.jupiter.api.Test;

class HexKernelTest {

    /**
     * Central differences with step h have truncation error ~h²·|f'''| and round-off ~ε|f|/h. With
     * h = 1e−6 mm on an element of 2–3 mm and displacements of ~10 % strain, f''' is of the order of
     * the tangent divided by the element size squared, so the truncation error relative to max |K|
     * is ~1e−12 and round-off ~1e−16/1e−6 = 1e−10; 1e−7 leaves margin for the log and power
     * functions of the energy.
     */
    static final double FD_RELATIVE_TOLERANCE = 1e-7;
    static final double FD_STEP_MM = 1e-6;

    /**
     * Round-off allowance for F of an affine map through the centre formula: a handful of products
     * and sums of O(1) numbers plus one 3×3 inverse of a well-conditioned (≈ 2 mm cube) Jacobian,
     * so errors of tens of ε ≈ 1e−15; 1e−12 leaves margin.
     */
    static final double AFFINE_F_TOLERANCE = 1e-12;

    /** A distorted single element (reference nodes perturbed from a 2 mm cube by up to 0.3 mm). */
    static double[] distortedElement(Random rnd) {
        double[] x = new double[24];
        for (int a = 0; a < 8; a++) {
            x[3 * a] = ReferenceGeometry.NODE_XI[a] + 0.3 * (rnd.nextDouble() - 0.5);
            x[3 * a + 1] = ReferenceGeometry.NODE_ETA[a] + 0.3 * (rnd.nextDouble() - 0.5);
            x[3 * a + 2] = ReferenceGeometry.NODE_ZETA[a] + 0.3 * (rnd.nextDouble() - 0.5);
        }
        return x;
    }

    static int[] oneHex() {
        return new int[] {0, 1, 2, 3, 4, 5, 6, 7};
    }

    @ParameterizedTest
    @EnumSource(HexFormulation.class)
    void tangentMatchesFiniteDifferenceOfInternalForce(HexFormulation form) {
        Random rnd = new Random(11);
        ReferenceGeometry geo = ReferenceGeometry.of(distortedElement(rnd), oneHex());
        double[] u = new double[24];
        for (int i = 0; i < 24; i++) {
            u[i] = 0.2 * (rnd.nextDouble() - 0.5);
        }
        HexKernel k = new HexKernel();
        double mu = 0.4;
        double kappa = 20;
        double[] fe = new double[24];
        double[] ke = new double[576];
        k.evaluate(geo, 0, u, mu, kappa, form, fe, ke);
        double maxK = 0;
        for (double v : ke) {
            maxK = Math.max(maxK, Math.abs(v));
        }
        double[] fp = new double[24];
        double[] fm = new double[24];
        double worst = 0;
        for (int j = 0; j < 24; j++) {
            double[] up = u.clone();
            double[] um = u.clone();
            up[j] += FD_STEP_MM;
            um[j] -= FD_STEP_MM;
            k.evaluate(geo, 0, up, mu, kappa, form, fp, null);
            k.evaluate(geo, 0, um, mu, kappa, form, fm, null);
            for (int i = 0; i < 24; i++) {
                double fd = (fp[i] - fm[i]) / (2 * FD_STEP_MM);
                worst = Math.max(worst, Math.abs(fd - ke[24 * i + j]));
            }
        }
        assertTrue(worst <= FD_RELATIVE_TOLERANCE * maxK, "max |K - dF/du| = " + worst + " vs max |K| " + maxK);
        // symmetric (derived from an energy)
        for (int i = 0; i < 24; i++) {
            for (int j = 0; j < 24; j++) {
                assertEquals(ke[24 * i + j], ke[24 * j + i], 1e-12 * maxK);
            }
        }
    }

    @ParameterizedTest
    @EnumSource(HexFormulation.class)
    void internalForceMatchesFiniteDifferenceOfEnergy(HexFormulation form) {
        Random rnd = new Random(12);
        ReferenceGeometry geo = ReferenceGeometry.of(distortedElement(rnd), oneHex());
        double[] u = new double[24];
        for (int i = 0; i < 24; i++) {
            u[i] = 0.3 * (rnd.nextDouble() - 0.5);
        }
        HexKernel k = new HexKernel();
        double[] fe = new double[24];
        k.evaluate(geo, 0, u, 1.0, 30, form, fe, null);
        double maxF = 0;
        for (double v : fe) {
            maxF = Math.max(maxF, Math.abs(v));
        }
        for (int j = 0; j < 24; j++) {
            double[] up = u.clone();
            double[] um = u.clone();
            up[j] += FD_STEP_MM;
            um[j] -= FD_STEP_MM;
            double fd = (k.evaluate(geo, 0, up, 1.0, 30, form, null, null)
                    - k.evaluate(geo, 0, um, 1.0, 30, form, null, null)) / (2 * FD_STEP_MM);
            assertEquals(fd, fe[j], FD_RELATIVE_TOLERANCE * maxF * 10, "component " + j);
        }
    }

    /** A rigid rotation stores no energy and produces no force (objectivity; common practice). */
    @ParameterizedTest
    @EnumSource(HexFormulation.class)
    void rigidRotationIsStressFree(HexFormulation form) {
        Random rnd = new Random(13);
        double[] x = distortedElement(rnd);
        ReferenceGeometry geo = ReferenceGeometry.of(x, oneHex());
        double c = Math.cos(0.7);
        double s = Math.sin(0.7);
        double[] u = new double[24];
        for (int a = 0; a < 8; a++) {
            double px = x[3 * a];
            double py = x[3 * a + 1];
            u[3 * a] = c * px - s * py - px + 5;
            u[3 * a + 1] = s * px + c * py - py - 2;
            u[3 * a + 2] = 1;
        }
        double[] fe = new double[24];
        double w = new HexKernel().evaluate(geo, 0, u, 1.0, 50, form, fe, null);
        assertEquals(0, w, 1e-12);
        for (double f : fe) {
            assertEquals(0, f, 1e-12);
        }
    }

    /**
     * Patch test, element level: a homogeneous deformation x = F X applied to every node of a patch
     * of distorted elements gives zero assembled force at the interior node (the discrete
     * divergence of a constant stress vanishes; Irons' patch test, common practice). Round-off:
     * forces of order μ·h² ≈ 1 mN·…, summed over 8 elements: 1e−12 relative.
     */
    @ParameterizedTest
    @EnumSource(HexFormulation.class)
    void patchOfDistortedElementsHasNoInteriorForceUnderHomogeneousDeformation(HexFormulation form) {
        Random rnd = new Random(14);
        // 2×2×2 patch, 27 nodes, interior node 13 moved off-centre
        double[] x = new double[81];
        for (int k = 0; k < 3; k++) {
            for (int j = 0; j < 3; j++) {
                for (int i = 0; i < 3; i++) {
                    int n = i + 3 * (j + 3 * k);
                    x[3 * n] = i + (i == 1 ? 0.25 * (rnd.nextDouble() - 0.5) : 0);
                    x[3 * n + 1] = j + (j == 1 ? 0.25 * (rnd.nextDouble() - 0.5) : 0);
                    x[3 * n + 2] = k + (k == 1 ? 0.25 * (rnd.nextDouble() - 0.5) : 0);
                }
            }
        }
        int[] hex = new int[64];
        int e = 0;
        for (int k = 0; k < 2; k++) {
            for (int j = 0; j < 2; j++) {
                for (int i = 0; i < 2; i++) {
                    int[] c = {idx(i, j, k), idx(i + 1, j, k), idx(i + 1, j + 1, k), idx(i, j + 1, k),
                            idx(i, j, k + 1), idx(i + 1, j, k + 1), idx(i + 1, j + 1, k + 1), idx(i, j + 1, k + 1)};
                    System.arraycopy(c, 0, hex, 8 * e++, 8);
                }
            }
        }
        ReferenceGeometry geo = ReferenceGeometry.of(x, hex);
        double[] f = {1.2, 0.3, -0.1, 0.05, 0.9, 0.2, 0.1, -0.15, 1.1};
        double[] fint = new double[81];
        double[] ue = new double[24];
        double[] fe = new double[24];
        HexKernel kernel = new HexKernel();
        double maxF = 0;
        for (e = 0; e < 8; e++) {
            for (int a = 0; a < 8; a++) {
                int n = hex[8 * e + a];
                for (int i = 0; i < 3; i++) {
                    double fx = f[3 * i] * x[3 * n] + f[3 * i + 1] * x[3 * n + 1] + f[3 * i + 2] * x[3 * n + 2];
                    ue[3 * a + i] = fx - x[3 * n + i];
                }
            }
            kernel.evaluate(geo, e, ue, 1.0, 40, form, fe, null);
            for (int a = 0; a < 8; a++) {
                for (int i = 0; i < 3; i++) {
                    fint[3 * hex[8 * e + a] + i] += fe[3 * a + i];
                    maxF = Math.max(maxF, Math.abs(fe[3 * a + i]));
                }
            }
        }
        assertTrue(maxF > 0.1, "the deformation must stress the patch");
        for (int i = 0; i < 3; i++) {
            assertEquals(0, fint[3 * 13 + i], 1e-12 * maxF * 100);
        }
    }

    private static int idx(int i, int j, int k) {
        return i + 3 * (j + 3 * k);
    }

    @Test
    void invertedElementHasInfiniteEnergy() {
        ReferenceGeometry geo = ReferenceGeometry.of(distortedElement(new Random(1)), oneHex());
        double[] u = new double[24];
        // push the top face through the bottom face
        for (int a = 4; a < 8; a++) {
            u[3 * a + 2] = -3;
        }
        HexKernel k = new HexKernel();
        assertEquals(Double.POSITIVE_INFINITY, k.evaluate(geo, 0, u, 1, 10, HexFormulation.STANDARD_Q1, null, null));
        assertTrue(k.minDetF() <= 0);
    }

    @Test
    void degenerateReferenceElementIsRejected() {
        double[] x = distortedElement(new Random(2));
        for (int a = 4; a < 8; a++) {
            x[3 * a + 2] = x[3 * (a - 4) + 2] - 0.5; // top below bottom: wrong node order
        }
        InvertedElementException ex = org.junit.jupiter.api.Assertions.assertThrows(InvertedElementException.class,
                () -> ReferenceGeometry.of(x, oneHex()));
        assertEquals(0, ex.element());
    }

    @Test
    void centreDeformationGradientWithReusedWorkspacesEqualsAFreshEvaluation() {
        // the workspaces keep the previous trial's values: a missing reset would show here
        Random rnd = new Random(23);
        double[] f = new double[9];
        double[] expected = new double[9];
        double[] j0 = new double[9];
        double[] jx = new double[9];
        double[] inv = new double[9];
        for (int t = 0; t < 200; t++) {
            double[] x = distortedElement(rnd);
            double[] u = new double[24];
            for (int i = 0; i < 24; i++) {
                u[i] = 0.6 * (rnd.nextDouble() - 0.5);
            }
            double det = HexKernel.centreDeformationGradient(x, u, f, j0, jx, inv);
            double detExpected = HexKernel.centreDeformationGradient(x, u, expected);
            assertEquals(Double.doubleToRawLongBits(detExpected), Double.doubleToRawLongBits(det), "det F, trial " + t);
            for (int q = 0; q < 9; q++) {
                assertEquals(Double.doubleToRawLongBits(expected[q]), Double.doubleToRawLongBits(f[q]),
                        "F[" + q + "], trial " + t);
            }
        }
        assertTrue(Math.abs(f[1]) > 1e-3, "sanity: the deformation has shear, F[1] = " + f[1]);
    }

    @Test
    void centreDeformationGradientOfAffineMapIsItsLinearPart() {
        // u = (A − I) X is reproduced exactly by trilinear shape functions, so F = A at any point of
        // any (distorted) element (closed form).
        double[] a = {1.1, 0.2, -0.05, 0.03, 0.9, 0.1, -0.1, 0.04, 1.05};
        double[] x = distortedElement(new Random(5));
        double[] u = new double[24];
        for (int n = 0; n < 8; n++) {
            for (int r = 0; r < 3; r++) {
                double y = a[3 * r] * x[3 * n] + a[3 * r + 1] * x[3 * n + 1] + a[3 * r + 2] * x[3 * n + 2];
                u[3 * n + r] = y - x[3 * n + r];
            }
        }
        double[] f = new double[9];
        double det = HexKernel.centreDeformationGradient(x, u, f);
        for (int q = 0; q < 9; q++) {
            assertEquals(a[q], f[q], AFFINE_F_TOLERANCE, "F[" + q + "]");
        }
        double detA = a[0] * (a[4] * a[8] - a[5] * a[7]) - a[1] * (a[3] * a[8] - a[5] * a[6])
                + a[2] * (a[3] * a[7] - a[4] * a[6]);
        assertEquals(detA, det, AFFINE_F_TOLERANCE);
    }
}
