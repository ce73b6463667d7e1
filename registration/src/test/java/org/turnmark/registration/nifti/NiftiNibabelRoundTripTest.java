package org.turnmark.registration.nifti;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.fail;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import java.util.Random;
import java.util.concurrent.TimeUnit;

import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Files written by Turnmark, read by the reference library nibabel (Debian python3-nibabel via
 * {@code /usr/bin/python3} and {@code src/test/resources/nifti/read_with_nibabel.py}): same affine,
 * same values, the same qform and sform. Without Debian's Python the test is skipped on a developer
 * machine but fails in CI ({@code CI=true}), where {@code .ci/run} installs it.
 */
class NiftiNibabelRoundTripTest {

    private static final String PYTHON = "/usr/bin/python3";

    /** nibabel's affine from float32 header fields vs Turnmark's double grid: see NiftiWriterTest. */
    private static final double FLOAT32_AFFINE_TOL_MM = 1e-5;

    @TempDir
    Path dir;

    @BeforeAll
    static void needNibabel() throws InterruptedException {
        boolean ok;
        try {
            Process p = new ProcessBuilder(PYTHON, "-c", "import nibabel").redirectErrorStream(true).start();
            p.getInputStream().readAllBytes();
            ok = p.waitFor(60, TimeUnit.SECONDS) && p.exitValue() == 0;
        } catch (IOException e) {
            ok = false;
        }
        if (!ok) {
            if ("true".equalsIgnoreCase(System.getenv("CI"))) {
                fail(PYTHON + " with nibabel is required in CI (apt package python3-nibabel)");
            }
            Assumptions.abort(PYTHON + " with nibabel not available");
        }
    }

    private static Map<String, Object> nibabel(Path file) throws IOException, InterruptedException {
        Path script = Fixtures.file("read_with_nibabel.py");
        Process p = new ProcessBuilder(PYTHON, script.toString(), file.toString()).start();
        byte[] out = p.getInputStream().readAllBytes();
        byte[] err = p.getErrorStream().readAllBytes();
        if (!p.waitFor(120, TimeUnit.SECONDS) || p.exitValue() != 0) {
            fail("nibabel failed on " + file + ": " + new String(err, StandardCharsets.UTF_8));
        }
        return MiniJson.object(MiniJson.parse(new String(out, StandardCharsets.UTF_8)));
    }

    private static void assertSameGeometry(Grid3 g, Map<String, Object> nib) {
        double[] want = g.voxelToWorld().toRowMajor();
        assertArrayEquals(want, MiniJson.matrix(nib.get("affine")), FLOAT32_AFFINE_TOL_MM, "nibabel img.affine");
        assertArrayEquals(want, MiniJson.matrix(nib.get("qform")), FLOAT32_AFFINE_TOL_MM, "nibabel get_qform()");
        assertArrayEquals(want, MiniJson.matrix(nib.get("sform")), FLOAT32_AFFINE_TOL_MM, "nibabel get_sform()");
        assertEquals(1.0, (Double) nib.get("qform_code"));
        assertEquals(1.0, (Double) nib.get("sform_code"));
        assertEquals("mm", nib.get("spatial_unit"));
        assertEquals(ResearchUse.DESCRIP, nib.get("descrip"));
    }

    private static void assertSameValues(float[] want, double[] got, int offset, String what) {
        for (int n = 0; n < want.length; n++) {
            if (want[n] != got[offset + n]) {
                fail(what + ": value " + n + " is " + got[offset + n] + " in nibabel, " + want[n] + " written");
            }
        }
    }

    @Test
    void float32VolumeReadsTheSameInNibabel() throws Exception {
        for (boolean leftHanded : new boolean[] {false, true}) {
            Grid3 g = NiftiWriterTest.obliqueGrid(leftHanded);
            float[] d = NiftiWriterTest.ramp(g.size(), new Random(5), false, -123.5f, 4567.25f);
            Path p = dir.resolve("f" + leftHanded + ".nii.gz");
            NiftiWriter.writeVolume(p, new Volume(g, d));
            Map<String, Object> nib = nibabel(p);
            assertArrayEquals(new double[] {7, 6, 5}, MiniJson.doubles(nib.get("shape")));
            assertEquals("float32", nib.get("datatype"));
            assertEquals(leftHanded ? -1.0 : 1.0, (Double) nib.get("qfac"));
            assertSameGeometry(g, nib);
            assertSameValues(d, MiniJson.doubles(nib.get("data")), 0, "float32 voxels");
        }
    }

    @Test
    void integerVolumesReadTheSameInNibabel() throws Exception {
        Grid3 g = NiftiWriterTest.obliqueGrid(true);
        float[] i16 = NiftiWriterTest.ramp(g.size(), new Random(6), true, -32768, 32767);
        float[] u8 = NiftiWriterTest.ramp(g.size(), new Random(7), true, 0, 255);
        Path p16 = dir.resolve("i16.nii");
        Path p8 = dir.resolve("u8.nii.gz");
        NiftiWriter.writeVolume(p16, new Volume(g, i16), NiftiDatatype.INT16);
        NiftiWriter.writeVolume(p8, new Volume(g, u8), NiftiDatatype.UINT8);
        Map<String, Object> n16 = nibabel(p16);
        Map<String, Object> n8 = nibabel(p8);
        assertEquals("int16", n16.get("datatype"));
        assertEquals("uint8", n8.get("datatype"));
        assertSameGeometry(g, n16);
        assertSameValues(i16, MiniJson.doubles(n16.get("data")), 0, "int16 voxels");
        assertSameValues(u8, MiniJson.doubles(n8.get("data")), 0, "uint8 voxels");
    }

    @Test
    void displacementFieldReadsTheSameInNibabel() throws Exception {
        Grid3 g = NiftiWriterTest.obliqueGrid(false);
        Random rnd = new Random(8);
        VectorField f = new VectorField(g, NiftiWriterTest.ramp(g.size(), rnd, false, -9, 9),
                NiftiWriterTest.ramp(g.size(), rnd, false, -8, 8), NiftiWriterTest.ramp(g.size(), rnd, false, -7, 7));
        Path p = dir.resolve("u.nii.gz");
        NiftiWriter.writeDisplacementField(p, f, "supine->prone");
        Map<String, Object> nib = nibabel(p);
        // nifti1.h vector layout: dim = 5, nt = 1, 3 components, planes in order x, y, z.
        assertArrayEquals(new double[] {7, 6, 5, 1, 3}, MiniJson.doubles(nib.get("shape")));
        assertEquals(1006.0, (Double) nib.get("intent_code"));
        assertEquals("supine->prone", nib.get("intent_name"));
        assertSameGeometry(g, nib);
        double[] data = MiniJson.doubles(nib.get("data"));
        for (int c = 0; c < 3; c++) {
            assertSameValues(f.component(c), data, c * g.size(), "component " + c);
        }
    }

    @Test
    void nibabelReadsTheFileTurnmarkReads() throws Exception {
        // The other direction on a file nibabel wrote: Turnmark's values equal nibabel's.
        Path p = Files.copy(Fixtures.file("made/sform_only.nii.gz"), dir.resolve("s.nii.gz"));
        Map<String, Object> nib = nibabel(p);
        NiftiVolume v = new NiftiReader().readVolume(p);
        assertArrayEquals(MiniJson.matrix(nib.get("affine")), v.header().voxelToWorld().toRowMajor(), 1e-9);
        assertSameValues(v.volume().data(), MiniJson.doubles(nib.get("data")), 0, "float32 voxels");
    }
}
