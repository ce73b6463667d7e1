package org.turnmark.app.export;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.json.JsonMapper;

import org.turnmark.app.pipeline.PlanArtifacts;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.geom.Progress;
import org.turnmark.geom.ResearchUse;
import org.turnmark.mechanics.mesh.VtkWriter;
import org.turnmark.registration.nifti.NiftiDatatype;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.volume.Volume;

/**
 * Writes a finished plan into an output folder, atomically as a whole ({@link OutputFolder}):
 * <pre>
 *   plan.json, lesions.csv, report.pdf
 *   fields/&lt;name&gt;.nii.gz (+ .json sidecar stating the direction)   displacement fields, intent 1006
 *   warped/prone_to_supine_&lt;method&gt;.nii.gz                     prone image warped by each method
 *   labels/labels_used.nii.gz, labels/ellipsoids95_prone_frame.nii.gz, labels/ellipsoids95_supine_frame.nii.gz
 *   mesh/mesh.vtk                                                  prone mesh with nodal displacements
 * </pre>
 * Every NIfTI file carries the caution in {@code descrip}; JSON files carry it as a field; the CSV
 * as its first line; the report on every page.
 */
public final class PlanWriter {

    private static final ObjectMapper SIDE = JsonMapper.builder().enable(SerializationFeature.INDENT_OUTPUT).build();

    private PlanWriter() {
    }

    /**
     * Writes everything.
     *
     * @param plan      the result
     * @param art       the artifacts
     * @param target    final output folder
     * @param overwrite whether an existing folder may be replaced
     * @param progress  progress ("writing outputs")
     * @return the list of files written, relative to the folder
     */
    public static List<String> write(PlanResult plan, PlanArtifacts art, Path target, boolean overwrite,
                                     Progress progress) throws IOException {
        try (OutputFolder out = OutputFolder.create(target, overwrite)) {
            Path d = out.dir();
            Files.createDirectories(d.resolve("fields"));
            Files.createDirectories(d.resolve("warped"));
            Files.createDirectories(d.resolve("labels"));
            Files.createDirectories(d.resolve("mesh"));
            progress.update("writing outputs", 0);
            PlanJson.write(plan, d.resolve("plan.json"));
            LesionsCsv.write(plan, d.resolve("lesions.csv"));
            int n = 0;
            for (Map.Entry<String, PlanArtifacts.Field> e : art.fields().entrySet()) {
                NiftiWriter.writeDisplacementField(d.resolve("fields/" + e.getKey() + ".nii.gz"), e.getValue().field(),
                        e.getValue().intentName());
                Map<String, Object> side = new LinkedHashMap<>();
                side.put("caution", ResearchUse.FULL);
                side.put("intent_code", 1006);
                side.put("intent_name", e.getValue().intentName());
                side.put("direction", e.getValue().meaning());
                side.put("components", "RAS (x right, y anterior, z superior), millimetres");
                Path sp = d.resolve("fields/" + e.getKey() + ".json");
                AtomicFiles.write(sp, os -> SIDE.writeValue(os, side));
                progress.update("writing outputs", 0.1 + 0.4 * ++n / art.fields().size());
            }
            for (Map.Entry<String, Volume> e : art.warped().entrySet()) {
                NiftiWriter.writeVolume(d.resolve("warped/prone_to_supine_" + e.getKey() + ".nii.gz"), e.getValue());
            }
            progress.update("writing outputs", 0.6);
            NiftiWriter.writeVolume(d.resolve("labels/labels_used.nii.gz"), art.labels(), NiftiDatatype.UINT8);
            for (Map.Entry<String, List<Ellipsoid>> e : art.ellipsoids95().entrySet()) {
                if (e.getValue().isEmpty()) {
                    continue;
                }
                boolean prone = PlanResult.FRAME_PRONE.equals(e.getKey());
                Volume grid = prone || art.supine() == null ? art.prone() : art.supine();
                Volume lab = EllipsoidLabels.render(grid.grid(), e.getValue());
                NiftiWriter.writeVolume(d.resolve("labels/ellipsoids95_" + (prone ? "prone" : "supine") + "_frame.nii.gz"),
                        lab, NiftiDatatype.UINT8);
            }
            VtkWriter vtk = new VtkWriter(art.mesh());
            for (Map.Entry<String, double[]> e : art.meshPointFields().entrySet()) {
                vtk.pointVectors(e.getKey(), e.getValue());
            }
            vtk.write(d.resolve("mesh/mesh.vtk"), VtkWriter.Encoding.BINARY);
            progress.update("writing outputs", 0.8);
            ReportPdf.write(plan, art, d.resolve("report.pdf"));
            progress.update("writing outputs", 1);
            List<String> files;
            try (var s = Files.walk(d)) {
                files = s.filter(Files::isRegularFile).map(p -> d.relativize(p).toString().replace('\\', '/'))
                        .sorted().toList();
            }
            out.commit();
            return files;
        }
    }
}
