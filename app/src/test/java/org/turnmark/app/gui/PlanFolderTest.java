package org.turnmark.app.gui;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class PlanFolderTest {

    @TempDir
    Path dir;

    @Test
    void readsPredictionsEllipsoidsFlagsAndViewableImages() throws IOException {
        Path c = GuiTestData.writeCase(dir);
        PlanFolder p = PlanFolder.read(GuiTestData.writePlan(dir.resolve("out"), c));
        // Prone centroid, then mechanics-only in both frames, then hybrid.
        assertEquals(4, p.results().size());
        ResultRow centroid = p.results().get(0);
        assertEquals("prone image", centroid.frame());
        assertTrue(centroid.descriptors().startsWith("left breast, 2:00 o'clock, upper-outer"), centroid.descriptors());
        ResultRow mech = p.results().get(2);
        assertEquals("L1", mech.lesion());
        assertEquals("mechanics-only", mech.method());
        assertEquals("supine image", mech.frame());
        assertEquals("(-36.5, -4.0, 8.0) mm", mech.positionRas());
        assertEquals("9.0, 6.0, 4.0 mm", mech.semiAxes95());
        assertTrue(mech.descriptors().contains("3.4 cm from the nipple"), mech.descriptors());
        assertTrue(p.results().get(3).descriptors().endsWith("error vs synthetic truth 1.2 mm"));

        Overlay hybrid = p.overlays().get(3);
        assertEquals(Overlay.Kind.HYBRID, hybrid.kind());
        assertEquals(Overlay.Posture.SUPINE, hybrid.posture());
        assertArrayEquals(GuiTestData.SUPINE_LESION, hybrid.centerRasMm(), 0.0);
        assertNotNull(hybrid.ellipsoid());
        assertEquals(0.95, hybrid.ellipsoid().probability(), 0.0);
        assertEquals(Overlay.Posture.PRONE, p.overlays().get(1).posture(), "prone-frame prediction");

        assertEquals(3, p.flags().size());
        assertTrue(p.flags().get(0).startsWith("Warning — method agreement: mechanics-only and hybrid differ"));
        assertEquals("Note: nipple detected as the most anterior skin point", p.flags().get(2));
        assertEquals(dir.resolve("out/report.pdf"), p.report());
        // Supine input, the warped image (on the supine grid), the label image (own grid: prone frame),
        // the prone input; the displacement field is not viewable.
        assertEquals(4, p.images().size());
        assertTrue(p.images().stream().noneMatch(i -> i.path().getParent().getFileName().toString().equals("fields")));
        assertEquals("supine image (input)", p.images().get(0).name());
        assertEquals(Overlay.Posture.SUPINE, p.images().get(0).posture());
        assertEquals("warped/prone to supine hybrid", p.images().get(1).name());
        assertEquals(Overlay.Posture.SUPINE, p.images().get(1).posture(), "on the supine grid");
        assertEquals("labels/labels used", p.images().get(2).name());
        assertEquals(Overlay.Posture.PRONE, p.images().get(2).posture(), "not on the supine grid");
        assertEquals("prone image (input)", p.images().get(3).name());
        assertTrue(p.inputs().stream().anyMatch(r -> r.key().equals("Case") && r.value().equals("gui-test")));
        assertTrue(p.inputs().stream().anyMatch(r -> r.key().equals("Mesh") && r.value().equals(
                "900 elements of 6.0 mm, 1200 nodes, chest wall sliding, 37 nodes held at the image edge")),
                p.inputs().toString());
    }

    @Test
    void aFolderWithoutPlanJsonIsNamedInTheError() throws IOException {
        Files.createDirectories(dir.resolve("empty"));
        IOException e = assertThrows(IOException.class, () -> PlanFolder.read(dir.resolve("empty")));
        assertTrue(e.getMessage().contains("plan.json not found"), e.getMessage());
    }

    @Test
    void brokenJsonIsNamedInTheError() throws IOException {
        Files.writeString(dir.resolve("plan.json"), "{\"flags\": [");
        IOException e = assertThrows(IOException.class, () -> PlanFolder.read(dir));
        assertTrue(e.getMessage().contains("plan.json: not a plan this version can read"), e.getMessage());
    }
}
