package org.turnmark.mechanics.mesh;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;

class LabelMesherTest {

    /** Volumes of lattice-aligned boxes are sums of exact parallelepipeds: round-off only. */
    private static final double ROUND_OFF_MM3 = 1e-9;
    /** Node positions are one affine evaluation: round-off on coordinates of ~100 mm. */
    private static final double ROUND_OFF_MM = 1e-10;

    /** Box of 16 x 12 x 8 voxels (1 mm) starting at voxel 2: cell boundaries of h = 2 mm fall on it. */
    private static byte[] box(Grid3 g) {
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBox(g, lab, 2, 18, 2, 14, 2, 10, 1);
        return lab;
    }

    @Test
    void alignedBoxGivesExactElementCountNodeCountAndVolume() {
        Grid3 g = Grid3.axisAligned(20, 16, 12, 1, 1, 1, 0, 0, 0);
        LabelMesh lm = LabelMesher.mesh(g, box(g), MesherConfig.of(2));
        // Closed form: (16/2)(12/2)(8/2) elements, (8+1)(6+1)(4+1) nodes, 16·12·8 mm³.
        assertEquals(192, lm.mesh().elementCount());
        assertEquals(315, lm.mesh().nodeCount());
        assertEquals(1536, lm.volumeMm3(), ROUND_OFF_MM3);
        assertEquals(192, lm.labelCounts()[1]);
        assertTrue(lm.warnings().isEmpty());
        assertArrayEquals(new int[] {192}, lm.componentSizes());
    }

    @Test
    void elementsHavePositiveVolumeForEveryAxisFlipAndObliqueAffine() {
        Affine3D rot = Affine3D.rotation(1, 2, 3, Math.toRadians(31));
        Affine3D[] affines = {
            new Affine3D(-1, 0, 0, 10, 0, -1, 0, 5, 0, 0, 1, -3), // LPS-stored image, right-handed
            new Affine3D(-1, 0, 0, 10, 0, 1, 0, 5, 0, 0, 1, -3), // left-handed (det < 0)
            new Affine3D(1, 0, 0, 0, 0, 1, 0, 0, 0, 0, -1, 0), // left-handed along k
            rot.compose(Affine3D.scaling(1, 1, 1)), // oblique
            rot.compose(new Affine3D(-1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0)), // oblique and left-handed
        };
        for (Affine3D a : affines) {
            Grid3 g = new Grid3(20, 16, 12, a);
            LabelMesh lm = LabelMesher.mesh(g, box(g), MesherConfig.of(2));
            double[] vm = LabelVolumes.volumeAndMin(lm.mesh());
            assertEquals(1536, vm[0], ROUND_OFF_MM3, "volume for " + a);
            // Each element is a 2 mm cube: det J = 8 mm³ at every corner.
            assertEquals(8, vm[1], 1e-9, "min corner det J for " + a);
            // Every node lies on the box in voxel coordinates (world -> voxel inverse of the affine).
            double[] xyz = lm.mesh().xyzMm();
            for (int n = 0; n < lm.mesh().nodeCount(); n++) {
                double[] v = g.worldToVoxel().applyPoint(xyz[3 * n], xyz[3 * n + 1], xyz[3 * n + 2]);
                for (int c = 0; c < 3; c++) {
                    double lo = 1.5;
                    double hi = c == 0 ? 17.5 : c == 1 ? 13.5 : 9.5;
                    assertTrue(v[c] >= lo - ROUND_OFF_MM && v[c] <= hi + ROUND_OFF_MM, "node " + n + " axis " + c);
                }
            }
        }
    }

    @Test
    void elementSizeIsIndependentOfAnisotropicSpacing() {
        // 0.5 x 1 x 2 mm voxels; box 16 x 12 x 8 mm placed so that 4 mm cells fit exactly.
        Grid3 g = Grid3.axisAligned(40, 20, 8, 0.5, 1, 2, 0, 0, 0);
        byte[] lab = new byte[g.size()];
        // Cell boundaries in voxel units: -0.5 + 8a (i), -0.5 + 4b (j), -0.5 + 2c (k).
        LabelVolumes.fillBox(g, lab, 8, 40, 4, 16, 2, 6, 2);
        LabelMesh lm = LabelMesher.mesh(g, lab, MesherConfig.of(4));
        assertEquals(4 * 3 * 2, lm.mesh().elementCount());
        assertEquals(16 * 12 * 8, lm.volumeMm3(), ROUND_OFF_MM3);
        assertEquals(24, lm.labelCounts()[2]);
    }

    @Test
    void ballVolumeLiesBetweenInnerAndOuterLatticeBounds() {
        double r = 12;
        Grid3 g = Grid3.axisAligned(60, 60, 60, 0.5, 0.5, 0.5, -15, -15, -15);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBall(g, lab, 0.2, -0.3, 0.1, r, 1);
        double h = 2;
        LabelMesh lm = LabelMesher.mesh(g, lab, MesherConfig.of(h));
        // Closed form bounds: a cell lying inside the ball shrunk by the sampling error δ (half a voxel
        // diagonal) is all tissue and kept; a kept cell meets the ball grown by δ; a cell's points are
        // within √3·h of each other. So 4/3 π (r − δ − √3 h)³ ≤ V ≤ 4/3 π (r + δ + √3 h)³.
        double delta = 0.5 * Math.sqrt(3) * 0.5;
        double lo = 4.0 / 3 * Math.PI * Math.pow(r - delta - Math.sqrt(3) * h, 3);
        double hi = 4.0 / 3 * Math.PI * Math.pow(r + delta + Math.sqrt(3) * h, 3);
        double v = lm.volumeMm3();
        assertTrue(v > lo && v < hi, "volume " + v + " not in [" + lo + ", " + hi + "]");
        // The majority rule is unbiased to first order: within 5 % of 4/3 π r³ (common practice for
        // h/r = 1/6; a systematic shift of h/2 would be 40 %).
        assertEquals(4.0 / 3 * Math.PI * r * r * r, v, 0.05 * 4.0 / 3 * Math.PI * r * r * r);
    }

    @Test
    void smallLesionIsKeptAsLesionElement() {
        Grid3 g = Grid3.axisAligned(24, 24, 24, 1, 1, 1, 0, 0, 0);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBox(g, lab, 0, 24, 0, 24, 0, 24, 1);
        // 3 x 3 x 3 voxel lesion inside the 4 mm cell (2, 2, 2) = voxels 7.5..11.5: 27/64 = 42 % lesion.
        LabelVolumes.fillBox(g, lab, 8, 11, 8, 11, 8, 11, 5);
        // A 1-voxel speck of lesion (1/64 < 25 %) stays fat.
        lab[g.index(20, 20, 20)] = 5;
        LabelMesh lm = LabelMesher.mesh(g, lab, MesherConfig.of(4));
        assertEquals(1, lm.labelCounts()[5]);
        int[] cell = lm.elementCell();
        for (int e = 0; e < cell.length; e++) {
            if (lm.mesh().label()[e] == 5) {
                assertEquals(2 + 6 * (2 + 6 * 2), cell[e]);
            }
        }
    }

    @Test
    void classificationMatchesNaiveSampling() {
        Random rnd = new Random(7);
        Grid3 g = Grid3.axisAligned(23, 19, 17, 0.7, 0.9, 1.3, 0, 0, 0);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBox(g, lab, 0, 23, 0, 19, 0, 17, 1);
        for (int n = 0; n < lab.length; n++) {
            if (rnd.nextDouble() < 0.35) {
                lab[n] = (byte) new int[] {0, 2, 3, 4, 5}[rnd.nextInt(5)];
            }
        }
        double h = 3.1;
        MesherConfig cfg = new MesherConfig(h, 0.5, 0.25, 0.9, 1_000_000);
        LabelMesh lm = LabelMesher.mesh(g, lab, cfg);
        int cx = lm.nodeLattice().nx() - 1;
        int cy = lm.nodeLattice().ny() - 1;
        int cz = lm.nodeLattice().nz() - 1;
        int[] expect = new int[cx * cy * cz];
        double[] sp = g.spacingMm();
        int[] dims = {g.nx(), g.ny(), g.nz()};
        int[] m = new int[3];
        for (int a = 0; a < 3; a++) {
            m[a] = Math.max(2, Math.min(8, (int) Math.ceil(h / sp[a])));
        }
        for (int c = 0; c < cz; c++) {
            for (int b = 0; b < cy; b++) {
                for (int a = 0; a < cx; a++) {
                    int[] count = new int[6];
                    int[] cellIdx = {a, b, c};
                    for (int qz = 0; qz < m[2]; qz++) {
                        for (int qy = 0; qy < m[1]; qy++) {
                            for (int qx = 0; qx < m[0]; qx++) {
                                int[] q = {qx, qy, qz};
                                int[] v = new int[3];
                                boolean in = true;
                                for (int d = 0; d < 3; d++) {
                                    double p = -0.5 + (cellIdx[d] + (q[d] + 0.5) / m[d]) * h / sp[d];
                                    v[d] = (int) Math.floor(p + 0.5);
                                    in &= v[d] >= 0 && v[d] < dims[d];
                                }
                                count[in ? lab[g.index(v[0], v[1], v[2])] : 0]++;
                            }
                        }
                    }
                    int total = m[0] * m[1] * m[2];
                    int tissue = count[1] + count[2] + count[3] + count[5];
                    int l = 0;
                    if (count[5] >= 0.25 * total) {
                        l = 5;
                    } else if (tissue >= 0.5 * total) {
                        l = 1;
                        for (int x : new int[] {2, 3, 5}) {
                            if (count[x] > count[l]) {
                                l = x;
                            }
                        }
                    }
                    expect[a + cx * (b + cy * c)] = l;
                }
            }
        }
        int[] got = new int[expect.length];
        for (int e = 0; e < lm.mesh().elementCount(); e++) {
            got[lm.elementCell()[e]] = lm.mesh().label()[e];
        }
        int tissueCells = 0;
        for (int x : expect) {
            tissueCells += x == 0 ? 0 : 1;
        }
        assertTrue(tissueCells > 10, "test case must not be trivial");
        // Dropped pieces aside (allowed by maxDroppedFraction 0.9), every kept element matches.
        for (int e = 0; e < lm.mesh().elementCount(); e++) {
            assertEquals(expect[lm.elementCell()[e]], lm.mesh().label()[e], "cell " + lm.elementCell()[e]);
        }
    }

    @Test
    void disconnectedTissueIsRejectedWithPieceSizes() {
        Grid3 g = Grid3.axisAligned(30, 10, 10, 1, 1, 1, 0, 0, 0);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBox(g, lab, 0, 10, 0, 10, 0, 10, 1);
        LabelVolumes.fillBox(g, lab, 20, 30, 0, 10, 0, 10, 2);
        MeshInputException ex = assertThrows(MeshInputException.class,
                () -> LabelMesher.mesh(g, lab, MesherConfig.of(1)));
        assertTrue(ex.getMessage().contains("disconnected") && ex.getMessage().contains("1000, 1000"),
                ex.getMessage());
    }

    @Test
    void tinyStrayPieceIsDroppedWithWarning() {
        Grid3 g = Grid3.axisAligned(30, 10, 10, 1, 1, 1, 0, 0, 0);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBox(g, lab, 0, 20, 0, 10, 0, 10, 1);
        lab[g.index(25, 5, 5)] = 2;
        LabelMesh lm = LabelMesher.mesh(g, lab, MesherConfig.of(1));
        assertEquals(2000, lm.mesh().elementCount());
        assertArrayEquals(new int[] {2000, 1}, lm.componentSizes());
        assertEquals(1, lm.warnings().size());
        assertTrue(lm.warnings().get(0).contains("dropped 1"), lm.warnings().get(0));
    }

    @Test
    void emptyTissueUnknownLabelAndBadSizesAreRejected() {
        Grid3 g = Grid3.axisAligned(10, 10, 10, 1, 1, 1, 0, 0, 0);
        byte[] air = new byte[g.size()];
        LabelVolumes.fillBox(g, air, 0, 10, 0, 3, 0, 10, 4);
        assertTrue(assertThrows(MeshInputException.class, () -> LabelMesher.mesh(g, air, MesherConfig.of(2)))
                .getMessage().contains("no tissue"));
        int[] bad = new int[g.size()];
        bad[g.index(3, 4, 5)] = 7;
        assertTrue(assertThrows(MeshInputException.class, () -> LabelMesher.mesh(g, bad, MesherConfig.of(2)))
                .getMessage().contains("unknown label 7 at voxel (3, 4, 5)"));
        assertThrows(IllegalArgumentException.class, () -> MesherConfig.of(0));
        assertThrows(IllegalArgumentException.class, () -> MesherConfig.of(-3));
        assertThrows(IllegalArgumentException.class, () -> MesherConfig.of(Double.NaN));
        byte[] body = new byte[g.size()];
        LabelVolumes.fillBox(g, body, 0, 10, 0, 10, 0, 10, 1);
        MeshInputException tooFine = assertThrows(MeshInputException.class,
                () -> LabelMesher.mesh(g, body, MesherConfig.of(1e-3)));
        assertTrue(tooFine.getMessage().contains("choose a larger element size"), tooFine.getMessage());
        MeshInputException tooMany = assertThrows(MeshInputException.class,
                () -> LabelMesher.mesh(g, body, new MesherConfig(1, 0.5, 0.25, 0.01, 999)));
        assertTrue(tooMany.getMessage().contains("1000 tissue elements"), tooMany.getMessage());
    }
}
