package org.turnmark.mechanics.mesh;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;

class ChestWallBoundaryTest {

    /**
     * A flat wall seen through a symmetric window gives its exact normal; deviations come only from
     * the window being cut by the image border or the wall's lateral end (excluded here by margin).
     */
    private static final double FLAT_NORMAL_TOLERANCE = 1e-9;

    /** Tissue box (labels 1) on a chest-wall slab (label 4) below it along voxel axis j. */
    private static byte[] slabAndBox(Grid3 g) {
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBox(g, lab, 0, 24, 0, 6, 0, 24, 4);
        LabelVolumes.fillBox(g, lab, 4, 20, 6, 18, 4, 20, 1);
        return lab;
    }

    @Test
    void boundarySurfaceOfBoxHasClosedFormAreaAndFaceCount() {
        Grid3 g = Grid3.axisAligned(24, 24, 24, 1, 1, 1, 0, 0, 0);
        byte[] lab = slabAndBox(g);
        LabelMesh lm = LabelMesher.mesh(g, lab, MesherConfig.of(2));
        MeshSurface s = MeshSurface.of(lm.mesh());
        // Box 16 x 12 x 16 mm of 2 mm cells: faces 2(8·6 + 8·8 + 6·8) = 320, area 2(16·12+16·16+12·16).
        assertEquals(320, s.faceCount());
        assertEquals(2 * (16 * 12 + 16 * 16 + 12 * 16), s.areaMm2(lm.mesh().xyzMm()), 1e-9);
    }

    @Test
    void chestWallNodesAreTheInterfaceNodesWithNormalTowardTissue() {
        Affine3D[] affines = {
            Affine3D.identity(),
            new Affine3D(-1, 0, 0, 0, 0, -1, 0, 0, 0, 0, 1, 0), // LPS-stored
            Affine3D.rotation(0.3, 1, -0.2, Math.toRadians(40)), // oblique
        };
        for (Affine3D a : affines) {
            Grid3 g = new Grid3(24, 24, 24, a);
            byte[] lab = slabAndBox(g);
            LabelMesh lm = LabelMesher.mesh(g, lab, MesherConfig.of(2));
            MeshSurface s = MeshSurface.of(lm.mesh());
            ChestWallBoundary.ChestWall cw = ChestWallBoundary.find(lm.mesh(), s, g, lab, 2);
            // The interface face is 8 x 8 cells: 9 x 9 nodes, all at voxel j = 5.5.
            assertEquals(81, cw.size(), "for " + a);
            assertEquals(0, cw.unresolvedNormals());
            // Outward chest-wall normal = world image of +j (the slab lies at lower j).
            double[] nj = {a.get(0, 1), a.get(1, 1), a.get(2, 1)};
            double len = Math.sqrt(nj[0] * nj[0] + nj[1] * nj[1] + nj[2] * nj[2]);
            double[] xyz = lm.mesh().xyzMm();
            for (int q = 0; q < cw.size(); q++) {
                int n = cw.nodes()[q];
                double[] v = g.worldToVoxel().applyPoint(xyz[3 * n], xyz[3 * n + 1], xyz[3 * n + 2]);
                assertEquals(5.5, v[1], 1e-9);
                // Nodes away from the slab's lateral ends see a symmetric window: exact normal.
                if (v[0] > 8 && v[0] < 16 && v[2] > 8 && v[2] < 16) {
                    for (int c = 0; c < 3; c++) {
                        assertEquals(nj[c] / len, cw.normals()[3 * q + c], FLAT_NORMAL_TOLERANCE);
                    }
                } else {
                    double dot = 0;
                    for (int c = 0; c < 3; c++) {
                        dot += nj[c] / len * cw.normals()[3 * q + c];
                    }
                    assertTrue(dot > 0.7, "normal at the wall's edge still points into the tissue: " + dot);
                }
            }
        }
    }

    @Test
    void rimIsTheBorderOfTheContactPatch() {
        Grid3 g = Grid3.axisAligned(24, 24, 24, 1, 1, 1, 0, 0, 0);
        byte[] lab = slabAndBox(g);
        LabelMesh lm = LabelMesher.mesh(g, lab, MesherConfig.of(2));
        MeshSurface s = MeshSurface.of(lm.mesh());
        ChestWallBoundary.ChestWall cw = ChestWallBoundary.find(lm.mesh(), s, g, lab, 2);
        boolean[] rim = cw.rim(s, lm.mesh().nodeCount());
        int count = 0;
        for (boolean b : rim) {
            count += b ? 1 : 0;
        }
        // The 9 x 9 node contact patch has a border of 4·9 − 4 = 32 nodes.
        assertEquals(32, count);
    }

    @Test
    void floatingBodyIsRejected() {
        Grid3 g = Grid3.axisAligned(24, 24, 24, 1, 1, 1, 0, 0, 0);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBox(g, lab, 0, 24, 0, 3, 0, 24, 4);
        LabelVolumes.fillBox(g, lab, 4, 20, 10, 18, 4, 20, 1);
        LabelMesh lm = LabelMesher.mesh(g, lab, MesherConfig.of(2));
        MeshInputException ex = assertThrows(MeshInputException.class,
                () -> ChestWallBoundary.find(lm.mesh(), MeshSurface.of(lm.mesh()), g, lab, 2));
        assertTrue(ex.getMessage().startsWith("floating body"), ex.getMessage());
    }
}
