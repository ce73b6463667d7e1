package org.turnmark.app.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.nifti.NiftiDatatype;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;
import picocli.CommandLine;

class SimulateCommandTest {

    /** Probe output is printed with 4 decimals (0.05 µm); the field is float32 (relative 6e-8). */
    private static final double PRINT_MM = 1e-4;

    @TempDir
    Path dir;

    /** Result of one command-line run. */
    private record Run(int code, String out, String err) {
    }

    private static Run run(String... args) {
        CommandLine cl = TurnmarkCommand.build();
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        cl.setOut(new PrintWriter(out));
        cl.setErr(new PrintWriter(err));
        int code = cl.execute(args);
        return new Run(code, out.toString(), err.toString());
    }

    /**
     * An invented phantom on a 2 mm grid: chest wall (4) for y &lt; 8 mm, a fat hemisphere of radius
     * 20 mm on it centred at (30, 8, 30) mm, a gland ball (2) and a small lesion (5) inside.
     */
    private static Volume phantom(boolean floating) {
        Grid3 g = Grid3.axisAligned(30, 24, 30, 2, 2, 2, 1, 1, 1);
        float[] lab = new float[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] p = g.worldOf(i, j, k);
                    int n = g.index(i, j, k);
                    double dx = p[0] - 30;
                    double dy = p[1] - 8;
                    double dz = p[2] - 30;
                    if (p[1] < 8) {
                        lab[n] = floating ? 0 : 4;
                    } else if (dx * dx + dy * dy + dz * dz <= 400 && (!floating || p[1] > 16)) {
                        double gy = p[1] - 16;
                        double ly = p[1] - 20;
                        lab[n] = dx * dx + gy * gy + dz * dz <= 16 ? 5 : dx * dx + ly * ly + dz * dz <= 64 ? 2 : 1;
                    }
                }
            }
        }
        return new Volume(g, lab);
    }

    private Path writeLabels(String name, Volume v) throws IOException {
        Path p = dir.resolve(name);
        NiftiWriter.writeVolume(p, v, NiftiDatatype.UINT8);
        return p;
    }

    private Path write(String name, String content) throws IOException {
        Path p = dir.resolve(name);
        Files.writeString(p, content, StandardCharsets.UTF_8);
        return p;
    }

    @Test
    void forwardPronePostureWritesAllOutputsAndProbesMatchTheField() throws IOException {
        Path labels = writeLabels("labels.nii.gz", phantom(false));
        // Apex voxel centre (29, 25, 29) mm inside the tissue, a point in the chest wall (outside), one in air.
        Path probes = write("probes.csv", "x_mm,y_mm,z_mm\n29,25,29\n29,3,29\n5,45,5\n");
        Path out = dir.resolve("prone");
        Run r = run("simulate", "--labels", labels.toString(), "--posture", "prone", "--tilt", "30",
                "--element-mm", "5", "--probes", probes.toString(), "--out", out.toString(), "--quiet");
        assertEquals(0, r.code(), r.err());
        assertTrue(r.out().contains(ResearchUse.SHORT));
        for (String f : List.of("mesh.vtk", "displacement.nii.gz", "tissue_mask.nii.gz", "probes.csv", "summary.json")) {
            assertTrue(Files.isRegularFile(out.resolve(f)), f);
        }
        List<String> lines = Files.readAllLines(out.resolve("probes.csv"));
        assertTrue(lines.get(0).startsWith("# RESEARCH USE ONLY"));
        assertEquals(SimulateOutputs.PROBES_HEADER, lines.get(1));
        assertEquals(5, lines.size());
        String[] apex = lines.get(2).split(",", -1);
        double uy = Double.parseDouble(apex[4]);
        // Prone gravity is +y (anterior, REFERENCE §2): the apex sags toward +y.
        assertTrue(uy > 0.5, "apex moves anteriorly: " + uy + " mm");
        assertTrue(lines.get(3).endsWith(",,,") && lines.get(4).endsWith(",,,"), "outside probes are blank");
        assertTrue(r.err().contains("probe 2") && r.err().contains("outside"), r.err());

        // The probe at a voxel centre equals the dense field there (same map, two code paths).
        VectorField f = new NiftiReader().readVectorField(out.resolve("displacement.nii.gz")).field();
        int v = f.grid().index(14, 12, 14);
        for (int c = 0; c < 3; c++) {
            assertEquals(Double.parseDouble(apex[3 + c]), f.component(c)[v], PRINT_MM);
        }
        Volume mask = new NiftiReader().readVolume(out.resolve("tissue_mask.nii.gz")).volume();
        assertEquals(1f, mask.data()[v]);
        assertEquals(0f, mask.data()[f.grid().index(14, 1, 14)]);
        assertEquals(0f, f.y()[f.grid().index(14, 1, 14)], "zero outside the tissue by default");

        JsonNode s = new ObjectMapper().readTree(out.resolve("summary.json").toFile());
        assertEquals(ResearchUse.FULL, s.get("caution").asText());
        assertTrue(s.get("solve").get("converged").asBoolean());
        assertTrue(s.get("mesh").get("chest_wall_nodes").asInt() > 10);
        assertTrue(s.get("mesh").get("sliding_nodes").asInt() > 0);
        assertEquals("input->loaded", s.get("displacement_field").get("intent_name").asText());
        // Prone g = (0, 9.81, 0) rolled by 30° about z (REFERENCE §2): (−9.81 sin 30°, 9.81 cos 30°, 0).
        JsonNode g = s.get("loads").get("gravity_output_m_s2");
        assertEquals(-4.905, g.get(0).asDouble(), 1e-12);
        assertEquals(9.81 * Math.sqrt(3) / 2, g.get(1).asDouble(), 1e-12);
        assertEquals(0, g.get(2).asDouble(), 1e-12);
        assertEquals(1, s.get("probes").get("inside").asInt());
        assertTrue(s.get("units").get("length").asText().contains("mm"));
    }

    @Test
    void supineGravityPushesTheApexTowardTheChestWallAndFixedWallHoldsNodes() throws IOException {
        Path labels = writeLabels("labels.nii.gz", phantom(false));
        Path probes = write("probes.csv", "x_mm,y_mm,z_mm\n29,25,29\n");
        Path out = dir.resolve("supine");
        Run r = run("simulate", "--labels", labels.toString(), "--gravity", "0,-9.81,0", "--chest-wall", "fixed",
                "--element-mm", "5", "--probes", probes.toString(), "--out", out.toString(), "--quiet");
        assertEquals(0, r.code(), r.err());
        String[] apex = Files.readAllLines(out.resolve("probes.csv")).get(2).split(",");
        assertTrue(Double.parseDouble(apex[4]) < -0.5, "apex moves posteriorly: " + apex[4]);
        JsonNode s = new ObjectMapper().readTree(out.resolve("summary.json").toFile());
        assertEquals(0, s.get("mesh").get("sliding_nodes").asInt());
        assertEquals(s.get("mesh").get("chest_wall_nodes").asInt(), s.get("mesh").get("fixed_nodes").asInt());
    }

    @Test
    void proneToSupineReloadReachesTheReferenceToleranceAndMovesTheApexPosteriorly() throws IOException {
        Path labels = writeLabels("labels.nii.gz", phantom(false));
        Path probes = write("probes.csv", "x_mm,y_mm,z_mm\n29,25,29\n");
        Path out = dir.resolve("reload");
        Run r = run("simulate", "--labels", labels.toString(), "--from", "prone", "--to", "supine", "--element-mm", "5",
                "--probes", probes.toString(), "--out", out.toString(), "--quiet");
        assertEquals(0, r.code(), r.err());
        assertTrue(Files.isRegularFile(out.resolve("reference_mesh.vtk")));
        JsonNode s = new ObjectMapper().readTree(out.resolve("summary.json").toFile());
        // Reloading the reference by prone gravity reproduces the prone image to the iteration's tolerance.
        assertTrue(s.get("reference_state").get("max_mismatch_mm").asDouble() <= 0.05, s.toString());
        assertEquals("input->target", s.get("displacement_field").get("intent_name").asText());
        String[] apex = Files.readAllLines(out.resolve("probes.csv")).get(2).split(",");
        // Prone sag (+y) is undone and supine gravity (−y) added: the apex moves posteriorly.
        assertTrue(Double.parseDouble(apex[4]) < -1, "apex moves posteriorly: " + apex[4]);
    }

    @Test
    void floatingBodyIsBadInputAndWritesNothing() throws IOException {
        Path labels = writeLabels("float.nii.gz", phantom(true));
        Path out = dir.resolve("o");
        Run r = run("simulate", "--labels", labels.toString(), "--posture", "supine", "--out", out.toString(),
                "--quiet");
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, r.code());
        assertTrue(r.err().contains("floating body"), r.err());
        assertFalse(Files.exists(out));
        try (var s = Files.list(dir)) {
            assertTrue(s.noneMatch(p -> p.getFileName().toString().contains(".partial-")), "no temporary left");
        }
    }

    @Test
    void unknownLabelIsBadInput() throws IOException {
        Volume v = phantom(false);
        v.data()[v.grid().index(3, 20, 4)] = 7;
        Path labels = writeLabels("bad.nii.gz", v);
        Run r = run("simulate", "--labels", labels.toString(), "--posture", "supine", "--out",
                dir.resolve("o").toString(), "--quiet");
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, r.code());
        assertTrue(r.err().contains("unknown label 7") && r.err().contains("(3, 20, 4)"), r.err());
    }

    @Test
    void badMaterialsFilesAreRejectedNamingTheProblem() throws IOException {
        Path labels = writeLabels("labels.nii.gz", phantom(false));
        String[][] cases = {
            {"{\"1\": {\"mu\": 0.5}}", "unknown key \"mu\""},
            {"{\"4\": {\"mu_kpa\": 0.5}}", "label 4 (chest wall)"},
            {"{\"9\": {\"mu_kpa\": 0.5}}", "unknown label 9"},
            {"{\"2\": {\"nu\": 0.5}}", "nu"},
            {"{\"2\": {\"mu_kpa\": -1}}", "-1"},
            {"{\"1\": {\"mu_kpa\": \"soft\"}}", "must be a number"},
            {"[1, 2]", "JSON object"},
            {"{\"1\": ", "not valid JSON"},
        };
        for (String[] c : cases) {
            Path m = write("m.json", c[0]);
            Run r = run("simulate", "--labels", labels.toString(), "--posture", "supine", "--materials",
                    m.toString(), "--out", dir.resolve("o").toString(), "--quiet");
            assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, r.code(), c[0]);
            assertTrue(r.err().contains(c[1]) && r.err().contains("m.json"), c[0] + " -> " + r.err());
        }
    }

    @Test
    void materialsFileOverridesOnlyTheGivenParameters() throws IOException {
        Path m = write("m.json", "{\"1\": {\"mu_kpa\": 0.6}, \"5\": {\"density_kg_m3\": 1100}}");
        var base = org.turnmark.mechanics.material.MaterialTable.DEFAULTS;
        var t = SimulateInputs.readMaterials(m, base);
        assertEquals(0.6, t.get(1).muKpa(), 0);
        assertEquals(base.get(1).nu(), t.get(1).nu(), 1e-12);
        assertEquals(base.get(1).densityKgM3(), t.get(1).densityKgM3(), 0);
        assertEquals(1100, t.get(5).densityKgM3(), 0);
        assertEquals(base.get(5).muKpa(), t.get(5).muKpa(), 0);
        assertEquals(base.get(2).muKpa(), t.get(2).muKpa(), 0);
    }

    @Test
    void existingNonEmptyOutputIsKeptWithoutOverwriteAndOptionsAreChecked() throws IOException {
        Path labels = writeLabels("labels.nii.gz", phantom(false));
        Path out = dir.resolve("busy");
        Files.createDirectories(out);
        Files.writeString(out.resolve("keep.txt"), "old");
        Run r = run("simulate", "--labels", labels.toString(), "--posture", "supine", "--out", out.toString(), "--quiet");
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, r.code());
        assertTrue(r.err().contains("--overwrite"), r.err());
        assertEquals("old", Files.readString(out.resolve("keep.txt")));
        Run both = run("simulate", "--labels", labels.toString(), "--posture", "supine", "--gravity", "0,1,0",
                "--out", dir.resolve("x").toString());
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, both.code());
        Run half = run("simulate", "--labels", labels.toString(), "--from", "prone", "--out", dir.resolve("x").toString());
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, half.code());
        assertTrue(half.err().contains("--to"), half.err());
        Run size = run("simulate", "--labels", labels.toString(), "--posture", "prone", "--element-mm", "0",
                "--out", dir.resolve("x").toString());
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, size.code());
        Path badProbe = write("p.csv", "x,y,z\n1,2,3\n");
        Run probe = run("simulate", "--labels", labels.toString(), "--posture", "prone", "--probes",
                badProbe.toString(), "--out", dir.resolve("x").toString());
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, probe.code());
        assertTrue(probe.err().contains("x_mm,y_mm,z_mm"), probe.err());
    }
}
