package org.turnmark.app.export;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.volume.Volume;

class ExportTest {

    /** CSV stores mm with 3 decimals: a round trip agrees to half of 0.001 mm. */
    private static final double CSV_ROUNDING_MM = 5e-4;

    @TempDir
    Path dir;

    @Test
    void planJsonRoundTripKeepsEveryValue() throws IOException {
        PlanResult plan = PlanFixtures.plan();
        Path f = dir.resolve("plan.json");
        PlanJson.write(plan, f);
        PlanResult back = PlanJson.read(f);
        // Re-serialising the read plan gives the same text: nothing lost or changed.
        assertEquals(PlanJson.toJson(plan), PlanJson.toJson(back));
        assertEquals(ResearchUse.FULL, back.caution());
        PlanResult.Prediction p = back.lesions().get(0).predictions().get(0);
        assertArrayEquals(new double[] {-65, 50, 20}, p.positionRasMm(), 0.0);
        assertEquals(7.25, p.errorVsTruthMm(), 0.0);
        assertArrayEquals(new double[] {1.5, -2, 0.25}, back.rigidAlignment().translationMm(), 0.0);
        assertEquals(-2, back.rigidAlignment().proneToSupineRas()[7], 0.0);
        assertTrue(Files.readString(f).contains("\"caution\""));
        assertTrue(Files.readString(f).contains("\"prone_to_supine_ras\""), "snake_case key in plan.json");
    }

    @Test
    void lesionsCsvStartsWithTheCautionAndRoundTrips() throws IOException {
        PlanResult plan = PlanFixtures.plan();
        Path f = dir.resolve("lesions.csv");
        LesionsCsv.write(plan, f);
        List<String> lines = Files.readAllLines(f, StandardCharsets.UTF_8);
        assertEquals("# " + ResearchUse.SHORT, lines.get(0));
        List<LesionsCsv.Row> rows = LesionsCsv.read(f);
        List<LesionsCsv.Row> expected = LesionsCsv.rows(plan);
        assertEquals(3, rows.size(), "marked + 2 methods");
        assertEquals(expected.size(), rows.size());
        for (int i = 0; i < rows.size(); i++) {
            for (String c : LesionsCsv.COLUMNS) {
                assertEquals(expected.get(i).get(c), rows.get(i).get(c), "row " + i + " column " + c);
            }
        }
        assertEquals("fixture, \"quoted\"", rows.get(0).get("case_id"), "RFC 4180 quoting survives");
        LesionsCsv.Row mech = rows.get(1);
        assertEquals(PlanResult.MECHANICS, mech.get("method"));
        assertEquals(-65, mech.number("x_ras_mm"), CSV_ROUNDING_MM);
        assertEquals(3.0, mech.number("sd_x_ras_mm"), CSV_ROUNDING_MM);
        assertEquals(Math.sqrt(7.81473 * Ellipsoid.of(new double[3], new double[] {9, 1, 0, 1, 4, 0, 0, 0, 1}, 0.95)
                .eigenvalues()[0]), mech.number("semi_axis_1_mm_95"), 1e-3);
        assertEquals("", rows.get(2).get("sd_x_ras_mm"), "no uncertainty for that method: blank");
    }

    @Test
    void lesionsCsvHeaderNamesTheFrameAndEveryNumericColumnItsUnit() throws IOException {
        Path f = dir.resolve("lesions.csv");
        LesionsCsv.write(PlanFixtures.plan(), f);
        assertEquals("case_id,lesion_id,side,method,frame,x_ras_mm,y_ras_mm,z_ras_mm,displacement_mm,"
                + "sd_x_ras_mm,sd_y_ras_mm,sd_z_ras_mm,semi_axis_1_mm_95,semi_axis_2_mm_95,semi_axis_3_mm_95,"
                + "clock,quadrant,distance_from_nipple_cm,depth_third,depth_from_skin_mm,depth_from_chest_wall_mm,"
                + "error_vs_truth_mm", Files.readAllLines(f, StandardCharsets.UTF_8).get(1));
        int numeric = 0;
        for (LesionsCsv.Row r : LesionsCsv.read(f)) {
            for (String c : LesionsCsv.COLUMNS) {
                if (r.get(c).matches("-?[0-9]+(\\.[0-9]+)?")) {
                    numeric++;
                    assertTrue(c.matches(".*_(mm|cm)(_95)?"), "numeric column without a unit: " + c);
                }
            }
        }
        assertTrue(numeric > 20, "sanity: the fixture has numeric cells, found " + numeric);
    }

    @Test
    void unknownDepthFromChestWallIsBlankInCsvAbsentInJsonAndNotAvailableInTheReport() throws IOException {
        PlanResult plan = PlanFixtures.plan(null);
        Path csv = dir.resolve("lesions.csv");
        LesionsCsv.write(plan, csv);
        List<LesionsCsv.Row> rows = LesionsCsv.read(csv);
        assertEquals("", rows.get(0).get("depth_from_chest_wall_mm"), "blank, not 0.000");
        assertEquals("12.500", rows.get(0).get("depth_from_skin_mm"));
        Path json = dir.resolve("plan.json");
        PlanJson.write(plan, json);
        assertFalse(Files.readString(json).contains("depth_from_chest_wall_mm"), "absent values are omitted");
        assertNull(PlanJson.read(json).lesions().get(0).proneDescriptors().depthFromChestWallMm());
        String line = ReportPdf.tableLine(LesionsCsv.rows(plan).get(0));
        assertTrue(line.contains("depth from chest wall not available"), line);
        assertFalse(line.contains("mm above chest wall"), line);
        // With a chest wall the same cells carry the value.
        PlanResult known = PlanFixtures.plan();
        assertEquals("30.250", LesionsCsv.rows(known).get(0).get("depth_from_chest_wall_mm"));
        assertTrue(ReportPdf.tableLine(LesionsCsv.rows(known).get(0)).contains("30.250 mm above chest wall"));
    }

    @Test
    void existingOutputFolderIsNotOverwrittenWithoutPermission() throws IOException {
        Path out = dir.resolve("plan");
        Files.createDirectories(out);
        Files.writeString(out.resolve("old.txt"), "old");
        assertThrows(OutputFolder.ExistsException.class, () -> OutputFolder.create(out, false));
        try (OutputFolder f = OutputFolder.create(out, true)) {
            Files.writeString(f.resolve("new.txt"), "new");
            f.commit();
        }
        assertTrue(Files.exists(out.resolve("new.txt")));
        assertFalse(Files.exists(out.resolve("old.txt")));
        try (Stream<Path> s = Files.list(dir)) {
            assertEquals(1, s.count(), "no temporary or old folders left beside the output");
        }
    }

    @Test
    void failedWriteLeavesNothingBehind() throws IOException {
        Path out = dir.resolve("plan");
        assertThrows(IllegalStateException.class, () -> {
            try (OutputFolder f = OutputFolder.create(out, false)) {
                Files.writeString(f.resolve("half.txt"), "half");
                throw new IllegalStateException("simulated failure mid-way");
            }
        });
        try (Stream<Path> s = Files.list(dir)) {
            assertEquals(0, s.count(), "neither the output nor a temporary folder exists");
        }
    }

    @Test
    void ellipsoidLabelVolumeMatchesTheClosedForm() {
        // Sphere-like ellipsoid with semi-axes (10, 8, 6) mm on a 0.5 mm grid: voxel count × 0.125 mm³
        // ≈ 4/3 π a b c = 2010.6 mm³; voxelisation error is bounded by surface area × half a voxel
        // diagonal / volume ≈ 4 %; allow 3 % (observed far smaller for centred voxels).
        Grid3 g = Grid3.axisAligned(60, 60, 60, 0.5, 0.5, 0.5, -15, -15, -15);
        double chi2 = Ellipsoid.chiSquare3(0.95);
        double[] cov = {100 / chi2, 0, 0, 0, 64 / chi2, 0, 0, 0, 36 / chi2};
        Ellipsoid e = Ellipsoid.of(new double[] {0.1, 0.2, 0.3}, cov, 0.95);
        Volume v = EllipsoidLabels.render(g, List.of(e));
        long n = 0;
        for (float x : v.data()) {
            if (x == 1) {
                n++;
            }
        }
        double vol = 4.0 / 3.0 * Math.PI * 10 * 8 * 6;
        assertEquals(vol, n * 0.125, 0.03 * vol);
        assertEquals(1f, v.data()[g.index(30, 30, 30)]);
        assertEquals(0f, v.data()[g.index(30, 30, 59)]);
    }
}
