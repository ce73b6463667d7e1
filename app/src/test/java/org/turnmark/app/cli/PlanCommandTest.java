package org.turnmark.app.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.app.export.LesionsCsv;
import org.turnmark.app.export.PlanJson;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.nifti.NiftiDatatype;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.volume.Volume;

class PlanCommandTest {

    @TempDir
    Path dir;

    private final StringWriter out = new StringWriter();
    private final StringWriter err = new StringWriter();

    private int run(String... args) {
        picocli.CommandLine cl = TurnmarkCommand.build();
        cl.setOut(new PrintWriter(out));
        cl.setErr(new PrintWriter(err));
        return cl.execute(args);
    }

    /** A tiny two-tissue slab case: cube of fat on a chest-wall slab, 4 mm voxels (invented). */
    private Path writeCase(String extra) throws IOException {
        Grid3 g = Grid3.axisAligned(20, 14, 16, 4, 4, 4, -40, -16, -32);
        float[] lab = new float[g.size()];
        float[] img = new float[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] p = g.worldOf(i, j, k);
                    int v = g.index(i, j, k);
                    double r = Math.sqrt((p[0] + 4) * (p[0] + 4) + p[1] * p[1] + p[2] * p[2]);
                    lab[v] = p[1] < 0 ? (Math.abs(p[0]) < 36 && Math.abs(p[2]) < 28 ? 4 : 0) : r < 30 ? 1 : 0;
                    img[v] = new float[] {5, 100, 40, 70, 40, 30}[(int) lab[v]];
                }
            }
        }
        NiftiWriter.writeVolume(dir.resolve("prone.nii.gz"), new Volume(g, img));
        NiftiWriter.writeVolume(dir.resolve("labels.nii.gz"), new Volume(g, lab), NiftiDatatype.UINT8);
        Path c = dir.resolve("case.json");
        Files.writeString(c, "{\"schema_version\": 1, \"prone_image\": \"prone.nii.gz\", \"labels\": \"labels.nii.gz\","
                + " \"laterality\": \"left\", \"lesions\": [{\"id\": \"L1\", \"position_ras_mm\": [-6, 12, 2]}],"
                + " \"model\": {\"element_size_mm\": 8}" + extra + "}");
        return c;
    }

    @Test
    void planWritesACompleteFolderWithTheCautionEverywhere() throws IOException {
        Path c = writeCase("");
        Path o = dir.resolve("out");
        int code = run("plan", c.toString(), "--out", o.toString(), "--quiet", "--samples", "0");
        assertEquals(0, code, err.toString());
        assertTrue(out.toString().contains(ResearchUse.SHORT));
        assertTrue(out.toString().contains("report.pdf"));
        PlanResult plan = PlanJson.read(o.resolve("plan.json"));
        assertEquals(ResearchUse.FULL, plan.caution());
        assertEquals(0, plan.uncertainty().samples());
        assertTrue(Files.readAllLines(o.resolve("lesions.csv")).get(0).startsWith("# "));
        assertEquals(2, LesionsCsv.read(o.resolve("lesions.csv")).size(), "marked + mechanics-only");
        assertTrue(Files.size(o.resolve("report.pdf")) > 1000);
        assertTrue(Files.readString(o.resolve("fields/mechanics.json")).contains("supine->prone"));
        String descrip = new NiftiReader().readHeader(o.resolve("fields/mechanics.nii.gz")).toString();
        assertTrue(Files.exists(o.resolve("mesh/mesh.vtk")));
        assertTrue(descrip.length() > 0);
        // A second run into the same folder without --overwrite is refused and changes nothing.
        long before = Files.getLastModifiedTime(o.resolve("plan.json")).toMillis();
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, run("plan", c.toString(), "--out", o.toString(), "--quiet"));
        assertTrue(err.toString().contains("--overwrite"), err.toString());
        assertEquals(before, Files.getLastModifiedTime(o.resolve("plan.json")).toMillis());
    }

    @Test
    void unknownKeyIsBadInputAndWritesNothing() throws IOException {
        Path c = writeCase(", \"lesion_radius\": 3");
        Path o = dir.resolve("out");
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, run("plan", c.toString(), "--out", o.toString(), "--quiet"));
        assertTrue(err.toString().contains("lesion_radius"), err.toString());
        assertFalse(Files.exists(o));
    }

    @Test
    void unreadableImageIsBadInputAndLeavesNoFolder() throws IOException {
        Path c = writeCase("");
        Files.write(dir.resolve("prone.nii.gz"), new byte[] {1, 2, 3, 4});
        Path o = dir.resolve("out");
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, run("plan", c.toString(), "--out", o.toString(), "--quiet"));
        assertTrue(err.toString().contains("prone_image"), err.toString());
        try (Stream<Path> s = Files.list(dir)) {
            assertTrue(s.noneMatch(p -> p.getFileName().toString().startsWith(".out") || p.endsWith("out")),
                    "no output and no temporary folder");
        }
    }
}
