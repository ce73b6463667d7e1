package org.turnmark.app.gui;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;

import org.turnmark.app.export.PlanJson;
import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.app.pipeline.CaseFileReader;
import org.turnmark.app.pipeline.Descriptors;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Small invented images and files for GUI tests: a box of "tissue" (value 300) with a bright spherical
 * "lesion" (value 900), written as NIfTI with an x-flipped voxel axis (i grows towards patient left) so
 * that orientation mistakes show, a case file naming them, and a plan folder with a {@code plan.json}.
 */
final class GuiTestData {

    /** Lesion centre in the prone image (RAS mm). */
    static final double[] PRONE_LESION = {-30.0, 20.0, 5.0};
    /** Lesion centre in the supine image (RAS mm). */
    static final double[] SUPINE_LESION = {-38.0, -6.0, 9.0};
    static final double LESION_RADIUS_MM = 6.0;
    static final int NX = 40;
    static final int NY = 36;
    static final int NZ = 24;
    static final double SPACING_MM = 2.5;

    private GuiTestData() {
    }

    /** 40 × 36 × 24 voxels of 2.5 mm, voxel i growing towards patient left (−x), centred on the origin. */
    static Grid3 grid() {
        double s = SPACING_MM;
        return new Grid3(NX, NY, NZ, new Affine3D(-s, 0, 0, s * (NX - 1) / 2, 0, s, 0, -s * (NY - 1) / 2,
                0, 0, s, -s * (NZ - 1) / 2));
    }

    static Volume phantom(double[] lesionRasMm) {
        Grid3 g = grid();
        float[] d = new float[g.size()];
        for (int k = 0; k < NZ; k++) {
            for (int j = 0; j < NY; j++) {
                for (int i = 0; i < NX; i++) {
                    double[] w = g.worldOf(i, j, k);
                    double dx = w[0] - lesionRasMm[0];
                    double dy = w[1] - lesionRasMm[1];
                    double dz = w[2] - lesionRasMm[2];
                    boolean body = Math.abs(w[0]) < 42 && w[1] < 30 && Math.abs(w[2]) < 25;
                    float v = body ? 300f : 10f;
                    if (dx * dx + dy * dy + dz * dz <= LESION_RADIUS_MM * LESION_RADIUS_MM) {
                        v = 900f;
                    }
                    d[g.index(i, j, k)] = v;
                }
            }
        }
        return new Volume(g, d);
    }

    /** Writes prone.nii.gz, supine.nii.gz and case.json into {@code dir}; returns the case file. */
    static Path writeCase(Path dir) throws IOException {
        NiftiWriter.writeVolume(dir.resolve("prone.nii.gz"), phantom(PRONE_LESION));
        NiftiWriter.writeVolume(dir.resolve("supine.nii.gz"), phantom(SUPINE_LESION));
        String json = """
                {
                  "schema_version": 1,
                  "case_id": "gui-test",
                  "description": "Invented box phantom for GUI tests.",
                  "prone_image": "prone.nii.gz",
                  "supine_image": "supine.nii.gz",
                  "laterality": "left",
                  "lesions": [
                    {"id": "L1", "position_ras_mm": [-30.0, 20.0, 5.0], "radius_mm": 6.0},
                    {"id": "L2", "position_voxel": [10, 20, 12]}
                  ],
                  "nipples": [{"side": "left", "position_ras_mm": [-30.0, 29.0, 0.0]}],
                  "uncertainty": {"samples": 0},
                  "output": "plans/gui-test"
                }
                """;
        Path c = dir.resolve("case.json");
        Files.writeString(c, json, StandardCharsets.UTF_8);
        return c;
    }

    /**
     * Writes a plan folder as the planner's export does for its plan.json ({@link PlanJson}): the case,
     * one lesion with mechanics-only predictions in both frames and a hybrid one with 95 % ellipsoids,
     * two flags and a warning; plus a warped image, a displacement field (not viewable) and a report.
     */
    static Path writePlan(Path dir, Path caseFile) throws IOException {
        Files.createDirectories(dir.resolve("warped"));
        Files.createDirectories(dir.resolve("fields"));
        NiftiWriter.writeVolume(dir.resolve("warped/prone_to_supine_hybrid.nii.gz"), phantom(SUPINE_LESION));
        // A label image on its own (prone-side) grid: not the supine grid, so shown in the prone frame.
        Files.createDirectories(dir.resolve("labels"));
        NiftiWriter.writeVolume(dir.resolve("labels/labels_used.nii.gz"),
                Volume.zeros(Grid3.axisAligned(8, 8, 8, 5, 5, 5, -20, -20, -20)));
        NiftiWriter.writeDisplacementField(dir.resolve("fields/hybrid.nii.gz"), VectorField.zeros(grid()),
                "prone->supine");
        Files.writeString(dir.resolve("report.pdf"), "%PDF-1.4\n", StandardCharsets.US_ASCII);
        CaseFile c = new CaseFileReader().read(caseFile);
        double[][] identity = {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
        double[][] rotated = {{0.6, 0.8, 0}, {-0.8, 0.6, 0}, {0, 0, 1}};
        Descriptors.Descriptor prone = new Descriptors.Descriptor("left", 2, "2:00", "upper-outer", 3.1, 0.4,
                "middle", 8.0, 20.0);
        Descriptors.Descriptor supine = new Descriptors.Descriptor("left", 2.5, "2:30", "upper-outer", 3.4, 0.5,
                "middle", 9.0, 12.0);
        List<PlanResult.Prediction> preds = List.of(
                new PlanResult.Prediction(PlanResult.MECHANICS, PlanResult.FRAME_PRONE, new double[] {-33, 10, 7},
                        null, null, null, new PlanResult.EllipsoidSummary(0.95, 7.81473, new double[] {8, 5, 3},
                        identity), supine, null, null),
                new PlanResult.Prediction(PlanResult.MECHANICS, PlanResult.FRAME_SUPINE, new double[] {-36.5, -4, 8},
                        null, null, null, new PlanResult.EllipsoidSummary(0.95, 7.81473, new double[] {9, 6, 4},
                        identity), supine, null, null),
                new PlanResult.Prediction(PlanResult.HYBRID, PlanResult.FRAME_SUPINE, SUPINE_LESION.clone(),
                        null, null, null, new PlanResult.EllipsoidSummary(0.95, 7.81473, new double[] {5, 4, 3},
                        rotated), supine, null, 1.2));
        PlanResult.LesionResult lesion = new PlanResult.LesionResult("L1", "left", PRONE_LESION.clone(),
                PRONE_LESION.clone(), "intensity-weighted within 6 mm", prone, preds, List.of());
        PlanResult plan = new PlanResult(ResearchUse.FULL, Map.of("turnmark", "test"), "2026-01-01T00:00:00Z", c,
                Map.of(), Map.of(), new PlanResult.ModelSummary(6, 900, 1200, 150, 37, "sliding", Map.of(), Map.of()),
                null, List.of(lesion),
                List.of(new PlanResult.QualityFlag(PlanResult.QualityFlag.WARNING, "method agreement",
                                "mechanics-only and hybrid differ by 3.4 mm, beyond the 95 % ellipsoids"),
                        new PlanResult.QualityFlag(PlanResult.QualityFlag.OK, "finite-element convergence",
                                "all solves converged; smallest det F 0.41")),
                List.of("nipple detected as the most anterior skin point"));
        PlanJson.write(plan, dir.resolve("plan.json"));
        return dir;
    }
}
