package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.Volume;

/** Meshing for the planner: detached tissue pieces and the lesion-in-model check. */
class MechanicsModelTest {

    /** Element edge for these models (mm): coarse, as in the calibration runs, so a thin strip detaches. */
    static final double ELEMENT_MM = 8;

    /**
     * The synthetic breast with a block of fat on the chest wall at x ∈ [30, 30 + width] mm (the image ends
     * at 60 mm), y ∈ [0, height] mm, |z| ≤ 40 mm, away from the breast (which ends at x = 0): a second
     * tissue piece.
     */
    private static byte[] withBlock(double widthMm, double heightMm) {
        Volume v = SyntheticCase.labels();
        Grid3 g = v.grid();
        byte[] l = CaseInputs.labelBytes(v, "synthetic");
        for (int n = 0; n < l.length; n++) {
            double[] p = g.worldOf(n % g.nx(), (n / g.nx()) % g.ny(), n / (g.nx() * g.ny()));
            if (p[0] >= 30 && p[0] <= 30 + widthMm && p[1] >= 0 && p[1] <= heightMm && Math.abs(p[2]) <= 40) {
                l[n] = 1;
            }
        }
        return l;
    }

    @Test
    void aSmallDetachedPieceIsDroppedWithAWarningAndALesionInItIsRefused() {
        // 16 × 12 × 80 mm ≈ 15,000 mm³ against the ≈ 134,000 mm³ hemisphere: about a tenth, above the
        // mesher's own 1 % but below the planner's 25 %
        MechanicsModel m = MechanicsModel.build(SyntheticCase.grid(), withBlock(16, 12), ELEMENT_MM);
        assertTrue(m.labelMesh().warnings().stream().anyMatch(w -> w.contains("dropped")),
                m.labelMesh().warnings().toString());
        m.requireModelled("lesion L1", SyntheticCase.LESION);
        PlanInputException e = assertThrows(PlanInputException.class,
                () -> m.requireModelled("lesion L2", new double[] {38, 6, 0}));
        assertTrue(e.getMessage().contains("lesion L2") && e.getMessage().contains("mm from the modelled tissue"),
                e.getMessage());
    }

    @Test
    void aLargeDetachedPieceIsStillAnError() {
        // 30 × 40 × 80 mm ≈ 96,000 mm³: about 40 % of the tissue, more than may be dropped
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> MechanicsModel.build(SyntheticCase.grid(), withBlock(30, 40), ELEMENT_MM));
        assertTrue(e.getMessage().contains("disconnected"), e.getMessage());
    }

    /**
     * Tissue cut by the field of view is held in place in both chest-wall conditions: a 10 mm fat layer on
     * the chest wall joining the breast to the image's low-x face (outer voxel face at x = −101.25 mm).
     * Exactly the nodes on that face are added to the fixed ones; the plain synthetic breast, clear of
     * every image face, has none.
     */
    @Test
    void tissueCutByTheFieldOfViewIsHeldInPlace() {
        Volume v = SyntheticCase.labels();
        Grid3 g = v.grid();
        byte[] l = CaseInputs.labelBytes(v, "synthetic");
        assertEquals(0, MechanicsModel.build(g, l, ELEMENT_MM).fieldOfViewNodes());
        for (int n = 0; n < l.length; n++) {
            double[] p = g.worldOf(n % g.nx(), (n / g.nx()) % g.ny(), n / (g.nx() * g.ny()));
            if (p[0] <= -40 && p[1] >= 0 && p[1] <= 10 && Math.abs(p[2]) <= 30 && l[n] == 0) {
                l[n] = 1;
            }
        }
        MechanicsModel m = MechanicsModel.build(g, l, ELEMENT_MM);
        double[] xyz = m.proneMesh().xyzMm();
        int onFace = 0;
        for (int n = 0; n < m.proneMesh().nodeCount(); n++) {
            onFace += Math.abs(xyz[3 * n] + 101.25) < 1e-9 ? 1 : 0;
        }
        assertTrue(onFace > 0, "the layer reaches the image face");
        assertEquals(onFace, m.fieldOfViewNodes());
        for (boolean sliding : new boolean[] {true, false}) {
            org.turnmark.mechanics.solve.NodeConstraints bc = m.constraints(sliding);
            for (int n = 0; n < m.proneMesh().nodeCount(); n++) {
                if (Math.abs(xyz[3 * n] + 101.25) < 1e-9) {
                    assertEquals(org.turnmark.mechanics.solve.NodeConstraints.Kind.FIXED, bc.kind(n), "node " + n);
                }
            }
        }
    }

    /**
     * A field of view that cuts the breast itself is told apart from one that cuts only the torso wall.
     * The synthetic breast (radius 40 mm on the chest wall at y = 0) cropped at y ≤ 30 mm: the image's
     * top face is at y = 31.25 mm, so every cut node is about 32 mm in front of the chest wall, beyond
     * 20 mm + one 8 mm element. The torso-layer case above stays within 10 mm + one element and gives no
     * warning.
     */
    @Test
    void aCutThroughTheBreastItselfIsWarnedAbout() {
        Volume v = SyntheticCase.labels();
        Grid3 g = v.grid();
        byte[] full = CaseInputs.labelBytes(v, "synthetic");
        int ny = 25; // y = −30 … 30 mm
        Grid3 cropped = Grid3.axisAligned(g.nx(), ny, g.nz(), SyntheticCase.SPACING_MM, SyntheticCase.SPACING_MM,
                SyntheticCase.SPACING_MM, -100, -30, -55);
        byte[] l = new byte[cropped.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < ny; j++) {
                for (int i = 0; i < g.nx(); i++) {
                    l[cropped.index(i, j, k)] = full[g.index(i, j, k)];
                }
            }
        }
        MechanicsModel m = MechanicsModel.build(cropped, l, ELEMENT_MM);
        MechanicsModel.BreastCut c = m.breastCut();
        assertTrue(m.fieldOfViewNodes() > 0, "the crop cuts the breast");
        assertEquals(m.fieldOfViewNodes(), c.nodes(), "every cut node lies in the breast, far from the chest wall");
        // the element lattice starts on the image's low face, y = −31.25 mm, in 8 mm steps: the chest-wall
        // nodes sit at y = 0.75 mm and the top cell reaches past the face to y = 32.75 mm, 32 mm above them;
        // the nearest wall node may sit off the vertical by up to half an element diagonal in x and z
        // (√2 · 4 mm), which adds at most √(32² + 5.66²) − 32 ≈ 0.50 mm
        assertEquals(32.0, c.maxDistanceMm(), 0.6);
        String w = m.breastCutWarning();
        assertTrue(w != null && w.contains("cuts the breast itself") && w.contains(c.nodes() + " mesh nodes"), w);

        for (int n = 0; n < full.length; n++) {
            double[] p = g.worldOf(n % g.nx(), (n / g.nx()) % g.ny(), n / (g.nx() * g.ny()));
            if (p[0] <= -40 && p[1] >= 0 && p[1] <= 10 && Math.abs(p[2]) <= 30 && full[n] == 0) {
                full[n] = 1;
            }
        }
        MechanicsModel torso = MechanicsModel.build(g, full, ELEMENT_MM);
        assertTrue(torso.fieldOfViewNodes() > 0);
        assertEquals(0, torso.breastCut().nodes());
        assertTrue(torso.breastCut().maxDistanceMm() <= 10 + ELEMENT_MM, "a cut through the torso layer stays "
                + "within its 10 mm thickness + one element of the chest wall: " + torso.breastCut());
        assertEquals(null, torso.breastCutWarning());
    }
}
