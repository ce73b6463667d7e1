package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.Volume;

/** When the rigid alignment is refined on the chest wall alone, and on which levels and mask. */
class SupineStageAlignmentTest {

    /** Chest wall (label 4) in the voxel columns i ∈ [i0, i1] of a grid, fat in the row j = 3 elsewhere. */
    private static byte[] wall(Grid3 g, int i0, int i1) {
        byte[] l = new byte[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    l[g.index(i, j, k)] = (byte) (i >= i0 && i <= i1 ? 4 : j == 3 ? 1 : 0);
                }
            }
        }
        return l;
    }

    @Test
    void theSpanIsTheLeftToRightExtentOfTheChestWallVoxelCentres() {
        Grid3 g = Grid3.axisAligned(60, 4, 4, 5, 5, 5, -100, 0, 0);
        // columns 3..30: centres from −85 to 50 mm
        assertEquals(135, SupineStage.chestWallSpanMm(g, wall(g, 3, 30)), 1e-9);
        assertEquals(0, SupineStage.chestWallSpanMm(g, new byte[g.size()]), "no chest wall");
        // the breast-field-of-view phantoms show 130–140 mm (below the threshold), the chest ones about 300 mm
        assertEquals(295, SupineStage.chestWallSpanMm(g, wall(g, 0, 59)), 1e-9);
        assertEquals(true, SupineStage.chestWallSpanMm(g, wall(g, 0, 59)) >= SupineStage.CHEST_WALL_MIN_SPAN_MM);
        assertEquals(false, SupineStage.chestWallSpanMm(g, wall(g, 3, 30)) >= SupineStage.CHEST_WALL_MIN_SPAN_MM);
    }

    @Test
    void aPlanOnAChestWideImageIsToldItsEllipsoidsWereCalibratedOnNarrowerOnes() {
        Grid3 g = Grid3.axisAligned(60, 4, 4, 5, 5, 5, -100, 0, 0);
        assertEquals(Planner.WIDE_FIELD_WARNING, Planner.wideFieldWarning(SupineStage.chestWallSpanMm(g, wall(g, 0, 59))));
        assertEquals(null, Planner.wideFieldWarning(SupineStage.chestWallSpanMm(g, wall(g, 3, 30))),
                "135 mm: around one breast");
    }

    /**
     * The chest-wall check's distance: two alignments that differ by a 2° turn about z through the origin
     * carry a point 100 mm from the axis 2 · 100 · sin(1°) = 3.49 mm apart (chord of the arc), and a pure
     * shift by its length.
     */
    @Test
    void theCheckMeasuresHowFarTwoAlignmentsCarryAPointApart() {
        org.turnmark.geom.Affine3D id = org.turnmark.geom.Affine3D.identity();
        org.turnmark.geom.Affine3D turn = org.turnmark.geom.Affine3D.rotation(0, 0, 1, Math.toRadians(2));
        assertEquals(200 * Math.sin(Math.toRadians(1)), SupineStage.carriedApartMm(id, turn, new double[] {100, 0, 7}),
                1e-9);
        assertEquals(0, SupineStage.carriedApartMm(id, turn, new double[] {0, 0, 50}), 1e-12, "on the axis");
        assertEquals(5, SupineStage.carriedApartMm(org.turnmark.geom.Affine3D.translation(3, 4, 0), id,
                new double[] {10, 20, 30}), 1e-12);
    }

    @Test
    void levelsAreTheNearestPyramidLevelsTo16And8And4Millimetres() {
        // level l has about 2^l times the finest spacing
        assertArrayEquals(new int[] {4, 3, 2}, SupineStage.levels(Grid3.axisAligned(8, 8, 8, 1, 1, 1, 0, 0, 0)));
        assertArrayEquals(new int[] {3, 2, 1}, SupineStage.levels(Grid3.axisAligned(8, 8, 8, 2, 2, 2, 0, 0, 0)));
        assertArrayEquals(new int[] {2, 1, 0}, SupineStage.levels(Grid3.axisAligned(8, 8, 8, 4, 4, 4, 0, 0, 0)));
        // 8 mm voxels: 16 → 1, 8 and 4 → 0 (no level finer than the image, none repeated)
        assertArrayEquals(new int[] {1, 0}, SupineStage.levels(Grid3.axisAligned(8, 8, 8, 8, 8, 8, 0, 0, 0)));
    }

    @Test
    void theMaskIsTheChestWallLabelOnTheMovingGrid() {
        Grid3 g = Grid3.axisAligned(40, 4, 4, 5, 5, 5, -100, 0, 0);
        byte[] l = wall(g, 3, 30);
        Volume same = SupineStage.chestWallMask(g, l, g);
        for (int v = 0; v < l.length; v++) {
            assertEquals(l[v] == 4 ? 1f : 0f, same.data()[v], "voxel " + v);
        }
        // a grid of 2.5 mm voxels over the same box: nearest neighbour, so a fine voxel takes its coarse
        // voxel's value away from ties
        Grid3 fine = Grid3.axisAligned(80, 8, 8, 2.5, 2.5, 2.5, -101.25, -1.25, -1.25);
        Volume onFine = SupineStage.chestWallMask(g, l, fine);
        for (int i = 0; i < fine.nx(); i++) {
            double x = fine.worldOf(i, 3, 3)[0];
            int coarse = (int) Math.floor((x + 100) / 5 + 0.5);
            assertEquals(coarse >= 3 && coarse <= 30 ? 1f : 0f, onFine.data()[fine.index(i, 3, 3)], "x " + x);
        }
    }
}
