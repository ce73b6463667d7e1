package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.registration.volume.Volume;

/** Automatic segmentation of the invented {@link SyntheticCase} (T1-like, smooth bias, seeded noise). */
class AutoSegmentationTest {

    /**
     * Dice of the body: only the outermost voxel layer of a 2.5 mm grid is ambiguous; for a body of
     * tens of thousands of voxels that bounds the loss to a few per cent.
     */
    private static final double BODY_DICE = 0.95;
    /** Dice of the fibroglandular sphere (radius 16 mm, about 6 voxels): boundary voxels split by partial contrast. */
    private static final double GLAND_DICE = 0.7;

    private static double dice(byte[] a, float[] truth, int[] aLabels, int[] tLabels) {
        long both = 0;
        long na = 0;
        long nt = 0;
        for (int v = 0; v < a.length; v++) {
            boolean x = contains(aLabels, a[v]);
            boolean y = contains(tLabels, (int) truth[v]);
            both += x && y ? 1 : 0;
            na += x ? 1 : 0;
            nt += y ? 1 : 0;
        }
        return 2.0 * both / (na + nt);
    }

    private static boolean contains(int[] set, int v) {
        for (int s : set) {
            if (s == v) {
                return true;
            }
        }
        return false;
    }

    @Test
    void recoversBodyChestWallAndGlandOfTheSyntheticCase() {
        Volume truth = SyntheticCase.labels();
        AutoSegmentation.Result r = AutoSegmentation.segment(SyntheticCase.image(truth, 5), null, Progress.NONE);
        byte[] l = r.labels();
        assertTrue(dice(l, truth.data(), new int[] {1, 2, 3, 4, 5}, new int[] {1, 2, 3, 4, 5}) > BODY_DICE);
        // Chest wall: the slab y < 0 (the breast base plane lies at y = 0).
        assertTrue(dice(l, truth.data(), new int[] {4}, new int[] {4}) > BODY_DICE);
        // The dark gland (and the darker lesion inside it) against bright fat.
        assertTrue(dice(l, truth.data(), new int[] {2}, new int[] {2, 5}) > GLAND_DICE);
        // Skin: every breast voxel touching air is skin.
        Grid3 g = r.grid();
        int v = g.index(24, g.ny() - 1, 22);
        assertEquals(0, l[v], "air above the breast");
    }

    @Test
    void chestWallPlaneThroughThreePointsOverridesTheAutomaticOne() {
        Volume truth = SyntheticCase.labels();
        // A plane at y = 10 mm: everything of the body posterior to it becomes chest wall.
        AutoSegmentation.Result r = AutoSegmentation.segment(SyntheticCase.image(truth, 5),
                List.of(new double[] {0, 10, 0}, new double[] {10, 10, 0}, new double[] {0, 10, 10}), Progress.NONE);
        Grid3 g = r.grid();
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    int v = g.index(i, j, k);
                    double y = g.worldOf(i, j, k)[1];
                    if (r.labels()[v] != 0 && y < 10 - 1e-9) {
                        assertEquals(4, r.labels()[v], "body voxel posterior to the plane at y = " + y);
                    }
                }
            }
        }
    }
}
