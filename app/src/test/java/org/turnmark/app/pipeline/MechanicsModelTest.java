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
}
