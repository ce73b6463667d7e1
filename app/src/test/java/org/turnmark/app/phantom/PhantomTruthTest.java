package org.turnmark.app.phantom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.mechanics.material.NeoHookeanMaterial;

/** Plausibility of the truth postures of the shared small case (REFERENCE §5, §6). */
class PhantomTruthTest {

    @Test
    void lesionMovesCentimetresAndTowardsTheChestWallWhenSupine() {
        PhantomCase c = PhantomFixture.small();
        double[] p = c.lesionProne();
        double[] s = c.lesionSupine();
        double d = Math.sqrt(sq(s[0] - p[0]) + sq(s[1] - p[1]) + sq(s[2] - p[2]));
        // "Prone→supine motion is large ... several cm" (REFERENCE §6): at least 1 cm, below 10 cm.
        assertTrue(d > 10 && d < 100, "lesion displacement " + d + " mm");
        // Distance to the chest wall in the body frame: the supine point is first taken back through
        // the rigid torso placement. Published: 56.4 mm prone vs 19.5 mm supine (Ann Surg Oncol 2014).
        Affine3D back = c.truth().supine().placement().inverse();
        double[] sb = back.applyPoint(s[0], s[1], s[2]);
        PhantomAnatomy a = c.anatomy();
        double prone = PhantomAnatomy.SUBCUTANEOUS_FAT_MM - a.torsoDepth(p[0], p[1]);
        double supine = PhantomAnatomy.SUBCUTANEOUS_FAT_MM - a.torsoDepth(sb[0], sb[1]);
        assertTrue(supine < prone, "chest-wall distance prone " + prone + " mm, supine " + supine + " mm");
        // Prone the nipple hangs anterior (+y) of its reference position; supine it sinks posterior (−y).
        assertTrue(c.nippleProne()[1] > c.nippleReference()[1]);
        double[] nb = back.applyPoint(c.nippleSupine()[0], c.nippleSupine()[1], c.nippleSupine()[2]);
        assertTrue(nb[1] < c.nippleReference()[1]);
    }

    @Test
    void truthFieldDoesNotFoldInTissue() {
        PhantomCase c = PhantomFixture.small();
        Grid3 g = c.grid();
        float[][] u = c.displacement();
        byte[] l = c.proneLabels();
        int nx = g.nx();
        int ny = g.ny();
        double h = g.spacingMm(0);
        int folded = 0;
        int checked = 0;
        for (int k = 1; k < g.nz() - 1; k++) {
            for (int j = 1; j < ny - 1; j++) {
                for (int i = 1; i < nx - 1; i++) {
                    int v = i + nx * (j + ny * k);
                    if (!allTissue(l, v, nx, ny)) {
                        continue;
                    }
                    // J = I + ∂u/∂x by central differences in world mm (REFERENCE §5).
                    double[] m = new double[9];
                    int[] step = {1, nx, nx * ny};
                    for (int r = 0; r < 3; r++) {
                        for (int q = 0; q < 3; q++) {
                            m[3 * r + q] = (u[r][v + step[q]] - u[r][v - step[q]]) / (2 * h) + (r == q ? 1 : 0);
                        }
                    }
                    double det = m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6])
                            + m[2] * (m[3] * m[7] - m[4] * m[6]);
                    checked++;
                    if (!(det > 0)) {
                        folded++;
                    }
                }
            }
        }
        assertTrue(checked > 500, "tissue voxels checked " + checked);
        assertEquals(0, folded);
        assertTrue(c.conditions().prone().minDetF() > 0 && c.conditions().supine().minDetF() > 0);
    }

    private static boolean allTissue(byte[] l, int v, int nx, int ny) {
        int[] nb = {v, v - 1, v + 1, v - nx, v + nx, v - nx * ny, v + nx * ny};
        for (int w : nb) {
            int x = l[w];
            if (x != 1 && x != 2 && x != 3 && x != 5) {
                return false;
            }
        }
        return true;
    }

    /**
     * Volume change of the tissue, ∫ det(I + ∇ũ) dX over reference tissue voxels against its reference
     * volume. Bound: the pressure in a column of tissue of height H under gravity is at most ρ g H, so
     * |ΔV/V| ≤ ρ g H / κ_min with κ = 2μ(1+ν)/(3(1−2ν)) (REFERENCE §6), H = 0.15 m (larger than the
     * case), ρ = 1100 kg/m³ (above every density used).
     */
    @Test
    void tissueVolumeIsConservedWithinTheMaterialsCompressibility() {
        PhantomCase c = PhantomFixture.small();
        double minMu = Double.MAX_VALUE;
        for (int lab : new int[] {1, 2, 3, 5}) {
            minMu = Math.min(minMu, c.conditions().muKpa()[lab]);
        }
        double kappaKpa = NeoHookeanMaterial.kappaFromMuNu(minMu, c.conditions().nu());
        double bound = 1100 * TruthMechanics.G * 0.15 / (kappaKpa * 1000);
        for (TruthPosture t : new TruthPosture[] {truthOf(c, true), truthOf(c, false)}) {
            double ratio = volumeRatio(c, t);
            assertTrue(Math.abs(ratio - 1) < bound, "volume ratio " + ratio + " bound " + bound);
            // Not trivial: near-incompressible (ν = 0.47) means well under 10 %.
            assertTrue(Math.abs(ratio - 1) < 0.1, "volume ratio " + ratio);
        }
    }

    private static TruthPosture truthOf(PhantomCase c, boolean prone) {
        return prone ? PhantomFixture.truth().prone() : PhantomFixture.truth().supine();
    }

    private static double volumeRatio(PhantomCase c, TruthPosture t) {
        Grid3 g = c.grid();
        byte[] l = c.referenceLabels();
        double[] u = new double[3];
        double[] J = new double[9];
        double sum = 0;
        long n = 0;
        for (int v = 0; v < g.size(); v++) {
            int x = l[v];
            if (x != 1 && x != 2 && x != 3 && x != 5) {
                continue;
            }
            int i = v % g.nx();
            int j = (v / g.nx()) % g.ny();
            int k = v / (g.nx() * g.ny());
            double[] p = g.worldOf(i, j, k);
            t.sample(p[0], p[1], p[2], u, J);
            double a00 = 1 + J[0];
            double a11 = 1 + J[4];
            double a22 = 1 + J[8];
            sum += a00 * (a11 * a22 - J[5] * J[7]) - J[1] * (J[3] * a22 - J[5] * J[6]) + J[2] * (J[3] * J[7] - a11 * J[6]);
            n++;
        }
        return sum / n;
    }

    /**
     * Landmark pairs against the truth field: prone landmark + u(prone landmark) read trilinearly from
     * the field on its 4 mm grid must give the supine landmark. The trilinear interpolation error of a
     * smooth field is ≤ h²/8 · max|∂²u| per axis; with the gravity deformation's curvature of about
     * 0.05 /mm near the skin this is ≈ 0.1 mm per axis, but cells straddling the skin or the sliding
     * chest wall mix in the rigid motion of air or chest wall; landmarks stay ≥ 8 mm inside, so one cell
     * away. 1 mm bounds the median and 3 mm every pair.
     */
    @Test
    void landmarkPairsAgreeWithTheTruthField() {
        PhantomCase c = PhantomFixture.small();
        double[] p = c.landmarkProne();
        double[] s = c.landmarkSupine();
        assertTrue(p.length / 3 >= 20);
        Grid3 g = c.grid();
        float[][] u = c.displacement();
        double[] err = new double[p.length / 3];
        for (int m = 0; m < err.length; m++) {
            double[] q = {p[3 * m], p[3 * m + 1], p[3 * m + 2]};
            double e = 0;
            for (int d = 0; d < 3; d++) {
                double ud = MrRenderer.trilinear(u[d], g, q);
                e += sq(q[d] + ud - s[3 * m + d]);
            }
            err[m] = Math.sqrt(e);
        }
        java.util.Arrays.sort(err);
        assertTrue(err[err.length / 2] < 1.0, "median " + err[err.length / 2] + " mm");
        assertTrue(err[err.length - 1] < 3.0, "max " + err[err.length - 1] + " mm");
    }

    @Test
    void inverseMapUndoesTheForwardMapOnTissue() {
        PhantomCase c = PhantomFixture.small();
        TruthPosture t = PhantomFixture.truth().supine();
        double[] b = c.landmarkReference();
        double[] x = new double[3];
        double[] back = new double[3];
        for (int m = 0; m < b.length; m += 3) {
            double[] X = {b[m], b[m + 1], b[m + 2]};
            t.forwardTissue(X, x);
            assertTrue(t.preimage(x[0], x[1], x[2], back));
            for (int d = 0; d < 3; d++) {
                // Newton tolerance of the inverse plus the rigid map's round-off.
                assertEquals(X[d], back[d], 10 * TruthPosture.INVERSE_TOLERANCE_MM);
            }
        }
    }

    private static double sq(double v) {
        return v * v;
    }
}
