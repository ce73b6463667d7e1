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
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.nifti.NiftiVectorField;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;

import picocli.CommandLine;

class RegisterCommandTest {

    private static final Grid3 GRID = Grid3.axisAligned(24, 22, 18, 2.5, 2.5, 2.5, -30, -27, -21);

    @TempDir
    Path tmp;

    /** An invented smooth image (blobs), shifted smoothly by a sinusoidal map of 2 mm amplitude. */
    private static float[] image(Grid3 g, boolean deformed) {
        float[] d = new float[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] p = g.worldOf(i, j, k);
                    double x = p[0];
                    double y = p[1];
                    double z = p[2];
                    if (deformed) {
                        x -= 2.0 * Math.sin(2 * Math.PI * y / 60);
                        z -= 1.5 * Math.cos(2 * Math.PI * x / 70);
                    }
                    double v = 50;
                    v += 80 * Math.exp(-((x - 5) * (x - 5) + y * y + (z - 3) * (z - 3)) / 60);
                    v += 60 * Math.exp(-((x + 12) * (x + 12) + (y - 8) * (y - 8) + z * z) / 40);
                    v += 40 * Math.sin(x / 4.0) * Math.cos(y / 5.0) * Math.sin(z / 6.0 + 0.3);
                    d[g.index(i, j, k)] = (float) v;
                }
            }
        }
        return d;
    }

    private int run(StringWriter out, StringWriter err, String... args) {
        CommandLine cl = TurnmarkCommand.build();
        cl.setOut(new PrintWriter(out));
        cl.setErr(new PrintWriter(err));
        return cl.execute(args);
    }

    private Path[] writePair() throws IOException {
        Path f = tmp.resolve("fixed.nii.gz");
        Path m = tmp.resolve("moving.nii.gz");
        NiftiWriter.writeVolume(f, new Volume(GRID, image(GRID, false)));
        NiftiWriter.writeVolume(m, new Volume(GRID, image(GRID, true)));
        return new Path[] {f, m};
    }

    @Test
    void writesFieldWithStatedConventionAndAllOutputs() throws Exception {
        Path[] p = writePair();
        Path out = tmp.resolve("reg");
        StringWriter o = new StringWriter();
        StringWriter e = new StringWriter();
        int code = run(o, e, "register", "--fixed", p[0].toString(), "--moving", p[1].toString(), "--metric", "ssd",
                "--iterations", "10,10", "--quiet", "--out", out.toString());
        assertEquals(0, code, e.toString());
        for (String name : new String[] {"displacement.nii.gz", "displacement.json", "warped.nii.gz", "jacobian.nii.gz",
            "summary.json"}) {
            assertTrue(Files.isRegularFile(out.resolve(name)), name);
        }
        NiftiVectorField u = new NiftiReader().readVectorField(out.resolve("displacement.nii.gz"));
        assertEquals(1006, u.header().intentCode());
        assertTrue(u.field().grid().sameGrid(GRID, 1e-4));
        JsonNode side = new ObjectMapper().readTree(out.resolve("displacement.json").toFile());
        assertTrue(side.get("convention").asText().contains("x + u(x)"));
        JsonNode sum = new ObjectMapper().readTree(out.resolve("summary.json").toFile());
        assertTrue(sum.get("improved").asBoolean());
        assertTrue(sum.get("cost_final").asDouble() < sum.get("cost_initial").asDouble());
        assertEquals(2, sum.get("levels_coarse_to_fine").size());
        assertTrue(sum.get("caution").asText().contains("RESEARCH USE ONLY"));
        assertTrue(o.toString().contains("RESEARCH USE ONLY"));
    }

    @Test
    void displacementHeaderReadsAsVectorIntentInNibabel() throws Exception {
        // Reference reader: Debian python3-nibabel (intent code 1006 = "vector displacement", shape
        // (nx, ny, nz, 1, 3)).
        Path[] p = writePair();
        Path out = tmp.resolve("reg2");
        int code = run(new StringWriter(), new StringWriter(), "register", "--fixed", p[0].toString(), "--moving",
                p[1].toString(), "--metric", "lncc", "--iterations", "4,4", "--quiet", "--out", out.toString());
        assertEquals(0, code);
        String script = "import nibabel as nib,sys; i=nib.load(sys.argv[1]); h=i.header; "
                + "print(int(h['intent_code']), h.get_intent()[2], i.shape)";
        List<String> cmd = new ArrayList<>(List.of("/usr/bin/python3", "-c", script,
                out.resolve("displacement.nii.gz").toString()));
        Process proc = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        assertTrue(proc.waitFor(60, TimeUnit.SECONDS));
        String text = new String(proc.getInputStream().readAllBytes(), StandardCharsets.UTF_8).trim();
        assertEquals(0, proc.exitValue(), text);
        assertEquals("1006 " + RegisterCommand.INTENT_NAME + " (24, 22, 18, 1, 3)", text);
    }

    @Test
    void constantMovingImageIsBadInputAndWritesNothing() throws Exception {
        Path[] p = writePair();
        Path flat = tmp.resolve("flat.nii.gz");
        NiftiWriter.writeVolume(flat, Volume.zeros(GRID));
        Path out = tmp.resolve("never");
        StringWriter e = new StringWriter();
        int code = run(new StringWriter(), e, "register", "--fixed", p[0].toString(), "--moving", flat.toString(),
                "--quiet", "--out", out.toString());
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, code);
        assertTrue(e.toString().contains("flat.nii.gz") && e.toString().contains("constant"), e.toString());
        assertFalse(Files.exists(out));
    }

    @Test
    void initialFieldOnAnotherGridNeedsExplicitResampling() throws Exception {
        Path[] p = writePair();
        Grid3 other = Grid3.axisAligned(12, 11, 9, 5, 5, 5, -30, -27, -21);
        Path init = tmp.resolve("init.nii.gz");
        NiftiWriter.writeDisplacementField(init, VectorField.zeros(other), RegisterCommand.INTENT_NAME);
        StringWriter e = new StringWriter();
        int code = run(new StringWriter(), e, "register", "--fixed", p[0].toString(), "--moving", p[1].toString(),
                "--initial", init.toString(), "--quiet", "--out", tmp.resolve("x").toString());
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, code);
        assertTrue(e.toString().contains("--resample-initial"), e.toString());
    }

    @Test
    void identicalImagesReportThatNothingCouldBeImproved() throws Exception {
        Path[] p = writePair();
        Path out = tmp.resolve("same");
        StringWriter e = new StringWriter();
        int code = run(new StringWriter(), e, "register", "--fixed", p[0].toString(), "--moving", p[0].toString(),
                "--metric", "ssd", "--iterations", "3", "--quiet", "--out", out.toString());
        assertEquals(TurnmarkCommand.EXIT_FAILED, code);
        assertTrue(e.toString().contains("could not improve"), e.toString());
        assertFalse(Files.exists(out));
    }

    @Test
    void helpListsOptionsAndCaution() {
        StringWriter o = new StringWriter();
        int code = run(o, new StringWriter(), "register", "--help");
        assertEquals(0, code);
        assertTrue(o.toString().contains("--initial") && o.toString().contains("RESEARCH USE ONLY"), o.toString());
    }

    @Test
    void unknownMetricIsAUsageError() throws Exception {
        Path[] p = writePair();
        StringWriter e = new StringWriter();
        int code = run(new StringWriter(), e, "register", "--fixed", p[0].toString(), "--moving", p[1].toString(),
                "--metric", "ncc2", "--out", tmp.resolve("y").toString());
        assertEquals(TurnmarkCommand.EXIT_BAD_INPUT, code);
        assertTrue(e.toString().contains("--metric"), e.toString());
    }
}
