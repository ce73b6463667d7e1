package org.turnmark.app.phantom;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;

class PhantomAnatomyTest {

    /** 3 mm voxels keep these reference-only tests fast. */
    private static final PhantomOptions OPTS = new PhantomOptions(11, 3.0, 1, "left", 400, 0.9, 0.4, 14, 2,
            PhantomOptions.Contrast.T1, 25, 6.0);

    /**
     * Lesion volume on a 0.5 mm lattice against the closed form π D³ / 6 (volume of a sphere of the
     * volume-equivalent diameter D): the lattice error is about surface × spacing / 2 / volume ≈ 3 · 0.25 / R
     * ≈ 11 % as an upper bound for R = 7 mm and in practice far less because errors cancel; 2 % is ample.
     */
    private static final double LESION_VOLUME_REL_TOL = 0.02;

    @Test
    void sameSeedGivesTheSameAnatomyAndAnotherSeedDoesNot() {
        PhantomAnatomy a = PhantomAnatomy.build(OPTS, Progress.NONE);
        PhantomAnatomy b = PhantomAnatomy.build(OPTS, Progress.NONE);
        assertArrayEquals(a.rasterizeLabels(a.grid()), b.rasterizeLabels(b.grid()));
        assertArrayEquals(a.branchPoints(), b.branchPoints());
        PhantomOptions other = new PhantomOptions(12, 3.0, 1, "left", 400, 0.9, 0.4, 14, 2,
                PhantomOptions.Contrast.T1, 25, 6.0);
        PhantomAnatomy c = PhantomAnatomy.build(other, Progress.NONE);
        assertFalse(Arrays.equals(a.branchPoints(), c.branchPoints()));
    }

    @Test
    void everyLabelIsPresentAndTheLeftBreastLiesOnTheLeft() {
        PhantomAnatomy a = PhantomAnatomy.build(OPTS, Progress.NONE);
        byte[] l = a.rasterizeLabels(a.grid());
        long[] count = new long[6];
        for (byte b : l) {
            count[b]++;
        }
        for (int k = 0; k < 6; k++) {
            assertTrue(count[k] > 0, "label " + k + " missing");
        }
        // RAS: patient left is −x (REFERENCE §2).
        assertTrue(a.nipple(0)[0] < 0);
        assertEquals("left", a.side(0));
        // Fibroglandular share of the breast tissue: mammographic densities span roughly 5–60 %
        // (common practice); a share outside that range would mean a broken gland field.
        double glandShare = count[2] / (double) (count[1] + count[2]);
        assertTrue(glandShare > 0.05 && glandShare < 0.6, "gland share " + glandShare);
    }

    @Test
    void lesionVolumeMatchesTheRequestedDiameter() {
        PhantomAnatomy a = PhantomAnatomy.build(OPTS, Progress.NONE);
        double h = 0.5;
        for (int n = 0; n < a.lesionCount(); n++) {
            double[] c = a.lesionCentre(n);
            long inside = 0;
            int m = (int) Math.ceil(12 / h);
            for (int k = -m; k <= m; k++) {
                for (int j = -m; j <= m; j++) {
                    for (int i = -m; i <= m; i++) {
                        if (a.insideLesion(n, c[0] + i * h, c[1] + j * h, c[2] + k * h)) {
                            inside++;
                        }
                    }
                }
            }
            double d = OPTS.lesionDiameterMm();
            double expected = Math.PI * d * d * d / 6;
            assertEquals(expected, inside * h * h * h, LESION_VOLUME_REL_TOL * expected);
            // Lesions lie in breast tissue, clear of skin and chest wall.
            assertEquals(PhantomAnatomy.LESION, a.tissueClass(c[0], c[1], c[2], PhantomAnatomy.SKIN_MM));
        }
    }

    @Test
    void skinSealsTheBodySoNoFatOrGlandVoxelTouchesAir() {
        PhantomAnatomy a = PhantomAnatomy.build(OPTS, Progress.NONE);
        Grid3 g = a.grid();
        byte[] l = a.rasterizeLabels(g);
        int nx = g.nx();
        int ny = g.ny();
        int touching = 0;
        for (int k = 1; k < g.nz() - 1; k++) {
            for (int j = 1; j < ny - 1; j++) {
                for (int i = 1; i < nx - 1; i++) {
                    int v = i + nx * (j + ny * k);
                    if (l[v] != 1 && l[v] != 2 && l[v] != 5) {
                        continue;
                    }
                    int[] nb = {v - 1, v + 1, v - nx, v + nx, v - nx * ny, v + nx * ny};
                    for (int w : nb) {
                        if (l[w] == 0) {
                            touching++;
                        }
                    }
                }
            }
        }
        assertEquals(0, touching);
    }

    @Test
    void atLeastTwentyBranchPointsLieInsideFibroglandularTissue() {
        PhantomAnatomy a = PhantomAnatomy.build(OPTS, Progress.NONE);
        double[] b = a.branchPoints();
        assertTrue(b.length / 3 >= 20, "branch points: " + b.length / 3);
        for (int m = 0; m < b.length; m += 3) {
            int c = a.tissueClass(b[m], b[m + 1], b[m + 2], PhantomAnatomy.SKIN_MM);
            assertTrue(c == PhantomAnatomy.GLAND || c == PhantomAnatomy.LESION, "landmark " + m / 3 + " class " + c);
        }
    }

    @Test
    void nippleIsOnTheSkinAtTheFrontOfTheMound() {
        PhantomAnatomy a = PhantomAnatomy.build(OPTS, Progress.NONE);
        double[] n = a.nipple(0);
        double[] e = a.moundAxis(0);
        // Bisection to 60 halvings: the tip lies on the zero level of the body distance.
        assertEquals(0, a.bodyDepth(n[0], n[1], n[2]), 1e-6);
        assertEquals(PhantomAnatomy.SKIN, a.tissueClass(n[0] - 0.5 * e[0], n[1] - 0.5 * e[1], n[2] - 0.5 * e[2],
                PhantomAnatomy.SKIN_MM));
        assertEquals(PhantomAnatomy.AIR, a.tissueClass(n[0] + 0.5 * e[0], n[1] + 0.5 * e[1], n[2] + 0.5 * e[2],
                PhantomAnatomy.SKIN_MM));
    }

    @Test
    void badOptionsAreRejectedWithTheFieldName() {
        IllegalArgumentException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
                () -> new PhantomOptions(1, 2.0, 1, "right", 350, 0.85, 0.3, 40, 1, PhantomOptions.Contrast.T1, 25, 5));
        assertTrue(e.getMessage().contains("lesion_mm"));
        assertTrue(e.getMessage().contains("40"));
    }

    /**
     * The chest field of view: the image spans both flanks of the torso and back to its centre line; the
     * breast, ducts and lesions are those of the same seed with the breast field of view (the ribs draw from
     * a stream of their own); labels stay 0–5, the chest wall under the muscle is drawn as bone, muscle
     * between ribs, lung and heart; the rib pitches lie in the stated range.
     */
    @Test
    void theChestFieldOfViewShowsTheWholeChestWithRibsAndKeepsTheBreast() {
        PhantomAnatomy breast = PhantomAnatomy.build(OPTS, Progress.NONE);
        PhantomAnatomy chest = PhantomAnatomy.build(OPTS.withFieldOfView(PhantomOptions.FieldOfView.CHEST),
                Progress.NONE);
        assertArrayEquals(breast.branchPoints(), chest.branchPoints());
        assertArrayEquals(breast.lesionCentre(0), chest.lesionCentre(0));
        assertArrayEquals(breast.nipple(0), chest.nipple(0));
        assertEquals(0, breast.ribCentresMm().length, "no ribs drawn with the breast field of view");
        Grid3 g = chest.grid();
        double[] lo = g.worldOf(0, 0, 0);
        double[] hi = g.worldOf(g.nx() - 1, g.ny() - 1, g.nz() - 1);
        assertTrue(lo[0] <= -PhantomAnatomy.TORSO_AX_MM && hi[0] >= PhantomAnatomy.TORSO_AX_MM, "both flanks");
        assertTrue(lo[1] <= PhantomAnatomy.TORSO_CY_MM, "back to the torso's centre line");
        assertEquals(breast.grid().worldOf(0, 0, 0)[2], lo[2], 1e-9, "same z extent");

        double[] ribs = chest.ribCentresMm();
        assertTrue(ribs.length >= 8, "ribs over the image and the 80 mm margins: " + ribs.length);
        for (int r = 1; r < ribs.length; r++) {
            double pitch = ribs[r] - ribs[r - 1];
            assertTrue(pitch >= PhantomAnatomy.RIB_PITCH_MIN_MM && pitch < PhantomAnatomy.RIB_PITCH_MAX_MM,
                    "pitch " + pitch);
        }
        // along a line at the middle of the rib layer, 60 mm right of the midline: bone on a rib's centre
        // line (raised by the lateral rise), muscle half-way between two ribs; sternum at the midline
        double depth = PhantomAnatomy.RIB_LAYER_MM + PhantomAnatomy.RIB_THICKNESS_MM / 2;
        double x = 60;
        double[] onSurface = surfacePoint(x);
        double[] inward = inwardNormal(x);
        double px = onSurface[0] + depth * inward[0];
        double py = onSurface[1] + depth * inward[1];
        int mid = ribs.length / 2;
        double rise = PhantomAnatomy.RIB_RISE * Math.abs(px);
        double skin = PhantomAnatomy.SKIN_MM;
        assertEquals(PhantomAnatomy.BONE, chest.tissueClass(px, py, ribs[mid] + rise, skin));
        assertEquals(PhantomAnatomy.MUSCLE, chest.tissueClass(px, py, 0.5 * (ribs[mid] + ribs[mid + 1]) + rise, skin));
        assertEquals(PhantomAnatomy.BONE, chest.tissueClass(0, -depth, 0.5 * (ribs[mid] + ribs[mid + 1]), skin),
                "sternum");
        assertEquals(PhantomAnatomy.LUNG, chest.tissueClass(90, -100, 0, skin));
        assertEquals(PhantomAnatomy.HEART, chest.tissueClass(PhantomAnatomy.HEART_CENTRE_XY_MM[0],
                PhantomAnatomy.HEART_CENTRE_XY_MM[1], 0.5 * (lo[2] + hi[2]) - 10, skin));
        for (int c : new int[] {PhantomAnatomy.BONE, PhantomAnatomy.LUNG, PhantomAnatomy.HEART}) {
            assertEquals(4, PhantomAnatomy.labelOf(c), "drawn inside the chest wall, labelled chest wall");
        }
        byte[] l = chest.rasterizeLabels(g);
        for (byte b : l) {
            assertTrue(b >= 0 && b <= 5, "label " + b);
        }
    }

    /** The torso surface point above x on the anterior ellipse (RAS mm). */
    private static double[] surfacePoint(double x) {
        double ay = PhantomAnatomy.TORSO_AY_MM * Math.sqrt(1 - Math.pow(x / PhantomAnatomy.TORSO_AX_MM, 2));
        return new double[] {x, PhantomAnatomy.TORSO_CY_MM + ay};
    }

    /** The inward unit normal of the torso ellipse at that point. */
    private static double[] inwardNormal(double x) {
        double[] p = surfacePoint(x);
        double gx = p[0] / (PhantomAnatomy.TORSO_AX_MM * PhantomAnatomy.TORSO_AX_MM);
        double gy = (p[1] - PhantomAnatomy.TORSO_CY_MM) / (PhantomAnatomy.TORSO_AY_MM * PhantomAnatomy.TORSO_AY_MM);
        double n = Math.hypot(gx, gy);
        return new double[] {-gx / n, -gy / n};
    }

}
