package org.turnmark.mechanics.mesh;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;

class FieldOfViewEdgeTest {

    /** 6 × 6 × 4 voxels of 2 mm; the slab fills it along x and z, voxel rows j = 2, 3 along y. */
    private static final Grid3 SLAB_GRID = Grid3.axisAligned(6, 6, 4, 2, 2, 2, 10, -20, 5);

    /** Fat (label 1) in the slab of {@link #SLAB_GRID}. */
    private static byte[] slab() {
        Grid3 g = SLAB_GRID;
        byte[] labels = new byte[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 2; j < 4; j++) {
                for (int i = 0; i < g.nx(); i++) {
                    labels[g.index(i, j, k)] = 1;
                }
            }
        }
        return labels;
    }

    private static LabelMesh mesh(Grid3 g, byte[] labels, double h) {
        return LabelMesher.mesh(g, labels, new MesherConfig(h, MesherConfig.DEFAULT_TISSUE_FRACTION,
                MesherConfig.DEFAULT_LESION_FRACTION, 0.0, MesherConfig.DEFAULT_MAX_ELEMENTS));
    }

    /**
     * A slab of fat that fills the image along x and z but not along y: its x and z faces are cuts, its y
     * faces are free surfaces. With 2 mm voxels and 4 mm elements the lattice meets every image face, so
     * the cut nodes are exactly the nodes with a lattice index 0 or last along x or z.
     */
    @Test
    void nodesOnTheImageFacesAreCutAndNodesInsideAreNot() {
        Grid3 g = SLAB_GRID;
        HexMesh m = mesh(g, slab(), 4).mesh();
        boolean[] cut = FieldOfViewEdge.cutNodes(m, g);
        // the image spans x from 10 − 1 to 10 + 11 mm, z from 5 − 1 to 5 + 7 mm (outer voxel faces)
        double[] xyz = m.xyzMm();
        int expected = 0;
        for (int n = 0; n < m.nodeCount(); n++) {
            double x = xyz[3 * n];
            double z = xyz[3 * n + 2];
            boolean onFace = Math.abs(x - 9) < 1e-9 || Math.abs(x - 21) < 1e-9 || Math.abs(z - 4) < 1e-9
                    || Math.abs(z - 12) < 1e-9;
            assertEquals(onFace, cut[n], "node " + n + " at x " + x + ", z " + z);
            expected += onFace ? 1 : 0;
        }
        // 3 × 1 × 2 cells (x, y, z) → 4 × 2 × 3 lattice points; not on an x or z face: 2 × 2 × 1
        assertEquals(4 * 2 * 3 - 2 * 2, expected);
        assertEquals(expected, FieldOfViewEdge.count(cut));
    }

    /** Tissue that keeps clear of the image faces has no cut, also under an oblique voxel-to-world affine. */
    @Test
    void tissueInsideTheImageHasNoCut() {
        int n = 8;
        double c = Math.cos(0.3);
        double s = Math.sin(0.3);
        Affine3D a = Affine3D.fromRowMajor(new double[] {2 * c, -2 * s, 0, 4, 2 * s, 2 * c, 0, -7, 0, 0, 2, 1,
            0, 0, 0, 1});
        Grid3 g = new Grid3(n, n, n, a);
        byte[] labels = new byte[n * n * n];
        for (int k = 2; k < 6; k++) {
            for (int j = 2; j < 6; j++) {
                for (int i = 2; i < 6; i++) {
                    labels[g.index(i, j, k)] = 2;
                }
            }
        }
        HexMesh m = mesh(g, labels, 2).mesh();
        boolean[] cut = FieldOfViewEdge.cutNodes(m, g);
        for (boolean b : cut) {
            assertFalse(b);
        }
        // the same block grown to the first voxel layer along z is cut on that face only
        for (int j = 2; j < 6; j++) {
            for (int i = 2; i < 6; i++) {
                labels[g.index(i, j, 0)] = 2;
                labels[g.index(i, j, 1)] = 2;
            }
        }
        HexMesh m2 = mesh(g, labels, 2).mesh();
        boolean[] cut2 = FieldOfViewEdge.cutNodes(m2, g);
        assertEquals(5 * 5, FieldOfViewEdge.count(cut2), "the 5 × 5 lattice points of the z = −½ face");
        assertTrue(cut2.length > 25);
    }

    /**
     * The distance of each cut node from the nearest chest-wall node is the brute-force minimum; nodes off
     * the cut are NaN, no wall gives +∞, and flags of the wrong length are refused. The slab of the first
     * test, with the nodes of its low-y face standing in for the chest wall.
     */
    @Test
    void distanceFromTheWallIsTheNearestWallNodeForCutNodesOnly() {
        Grid3 g = SLAB_GRID;
        HexMesh m = mesh(g, slab(), 4).mesh();
        boolean[] cut = FieldOfViewEdge.cutNodes(m, g);
        double[] xyz = m.xyzMm();
        double yLow = Double.POSITIVE_INFINITY;
        for (int n = 0; n < m.nodeCount(); n++) {
            yLow = Math.min(yLow, xyz[3 * n + 1]);
        }
        java.util.List<Integer> wall = new java.util.ArrayList<>();
        for (int n = 0; n < m.nodeCount(); n++) {
            if (Math.abs(xyz[3 * n + 1] - yLow) < 1e-9) {
                wall.add(n);
            }
        }
        int[] w = wall.stream().mapToInt(Integer::intValue).toArray();
        double[] d = FieldOfViewEdge.distanceFromWallMm(m, cut, w);
        for (int n = 0; n < m.nodeCount(); n++) {
            if (!cut[n]) {
                assertTrue(Double.isNaN(d[n]), "node " + n + " is not on the cut");
                continue;
            }
            // every node has a wall node straight below it (same x and z), so the distance is its height
            assertEquals(xyz[3 * n + 1] - yLow, d[n], 1e-12, "node " + n);
        }
        double[] none = FieldOfViewEdge.distanceFromWallMm(m, cut, new int[0]);
        for (int n = 0; n < m.nodeCount(); n++) {
            assertTrue(cut[n] ? none[n] == Double.POSITIVE_INFINITY : Double.isNaN(none[n]));
        }
        org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
                () -> FieldOfViewEdge.distanceFromWallMm(m, new boolean[3], w));
    }
}
