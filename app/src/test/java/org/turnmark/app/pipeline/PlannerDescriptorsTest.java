package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import org.junit.jupiter.api.Test;
import org.turnmark.mechanics.mesh.HexMesh;

/** Depths of the planner's descriptors on a one-element model (hand-computed distances). */
class PlannerDescriptorsTest {

    /** Closest-point distances to axis-aligned faces are exact sums of a few mm values. */
    private static final double DISTANCE_TOLERANCE_MM = 1e-12;

    /** A 10 mm cube, nodes in hexahedron order; the y = 0 face (nodes 0, 1, 4, 5) is the posterior one. */
    private static final HexMesh CUBE = new HexMesh(new double[] {
        0, 0, 0, 10, 0, 0, 10, 10, 0, 0, 10, 0,
        0, 0, 10, 10, 0, 10, 10, 10, 10, 0, 10, 10}, new int[] {0, 1, 2, 3, 4, 5, 6, 7}, new int[] {1});
    private static final double[] LESION = {5, 3, 5};
    private static final double[] NIPPLE = {5, 10, 5};

    @Test
    void depthFromChestWallIsAbsentWhenTheModelHasNoChestWallFaces() {
        Surfaces s = Surfaces.of(CUBE, new int[0]);
        Descriptors.Descriptor d = Planner.describe("right", LESION, NIPPLE, s, CUBE.xyzMm());
        assertNull(d.depthFromChestWallMm(), "no chest-wall surface: unknown, not 0 mm");
        // Every face is skin, so the y = 0 face (3 mm away) is the nearest skin.
        assertEquals(3.0, d.depthFromSkinMm(), DISTANCE_TOLERANCE_MM);
    }

    @Test
    void depthFromChestWallIsTheDistanceToThePosteriorFace() {
        Surfaces s = Surfaces.of(CUBE, new int[] {0, 1, 4, 5});
        Descriptors.Descriptor d = Planner.describe("right", LESION, NIPPLE, s, CUBE.xyzMm());
        // Lesion 3 mm in front of the y = 0 chest-wall face; skin 5 mm away (x and z faces).
        assertEquals(3.0, d.depthFromChestWallMm(), DISTANCE_TOLERANCE_MM);
        assertEquals(5.0, d.depthFromSkinMm(), DISTANCE_TOLERANCE_MM);
        // Nipple (y = 10) to chest-wall point (5, 0, 5): the lesion is 7 of 10 mm along, posterior third.
        assertEquals(0.7, d.depthFraction(), DISTANCE_TOLERANCE_MM);
        assertEquals("posterior", d.depthThird());
    }
}
