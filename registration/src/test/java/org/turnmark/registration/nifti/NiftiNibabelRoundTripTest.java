package org.turnmark.registration.nifti;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.fail;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
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
 * machine but fails in CI ({@code CI=true}), where {@code .ci/run} installs it. All files are
 * written first and read by one Python process (starting nibabel takes seconds).
 */
class NiftiNibabelRoundTripTest {

    private static final String PYTHON = "/usr/bin/python3";

    /** nibabel's affine from float32 header fields vs Turnmark's double grid: see NiftiWriterTest. */
    private static final double FLOAT32_AFFINE_TOL_MM = 1e-5;

    @TempDir
    static Path dir;

    private static Grid3 rightGrid;
    private static Grid3 leftGrid;
    private static float[] f32Right;
    private static float[] f32Left;
    private static float[] i16;
    private static float[] u8;
    private static VectorField field;
    private static NiftiVolume turnmarkReadOfNibabelFile;
    private static Map<String, Object> nib;

    @BeforeAll
    static void writeFilesAndReadThemWithNibabel() throws IOException, InterruptedException {
        needNibabel();
        rightGrid = NiftiWriterTest.obliqueGrid(false);
        leftGrid = NiftiWriterTest.obliqueGrid(true);
        f32Right = NiftiWriterTest.ramp(rightGrid.size(), new Random(5), false, -123.5f, 4567.25f);
        f32Left = NiftiWriterTest.ramp(leftGrid.size(), new Random(4), false, -1e-3f, 2.5e6f);
        i16 = NiftiWriterTest.ramp(leftGrid.size(), new Random(6), true, -32768, 32767);
        u8 = NiftiWriterTest.ramp(leftGrid.size(), new Random(7), true, 0, 255);
        Random rnd = new Random(8);
        field = new VectorField(rightGrid, NiftiWriterTest.ramp(rightGrid.size(), rnd, false, -9, 9),
                NiftiWriterTest.ramp(rightGrid.size(), rnd, false, -8, 8),
                NiftiWriterTest.ramp(rightGrid.size(), rnd, false, -7, 7));
        NiftiWriter.writeVolume(dir.resolve("right.nii.gz"), new Volume(rightGrid, f32Right));
        NiftiWriter.writeVolume(dir.resolve("left.nii"), new Volume(leftGrid, f32Left));
        NiftiWriter.writeVolume(dir.resolve("i16.nii"), new Volume(leftGrid, i16), NiftiDatatype.INT16);
        NiftiWriter.writeVolume(dir.resolve("u8.nii.gz"), new Volume(leftGrid, u8), NiftiDatatype.UINT8);
        NiftiWriter.writeDisplacementField(dir.resolve("u.nii.gz"), field, "supine->prone");
        Path nibFile = Files.copy(Fixtures.file("made/sform_only.nii.gz"), dir.resolve("nibabel.nii.gz"));
        turnmarkReadOfNibabelFile = new NiftiReader().readVolume(nibFile);

        List<String> cmd = new ArrayList<>(List.of(PYTHON, Fixtures.file("read_with_nibabel.py").toString()));
        for (String f : new String[] {"right.nii.gz", "left.nii", "i16.nii", "u8.nii.gz", "u.nii.gz", "nibabel.nii.gz"}) {
            cmd.add(dir.resolve(f).toString());
        }
        Process p = new ProcessBuilder(cmd).redirectError(ProcessBuilder.Redirect.DISCARD).start();
        byte[] out = p.getInputStream().readAllBytes();
        if (!p.waitFor(300, TimeUnit.SECONDS) || p.exitValue() != 0) {
            fail("nibabel could not read the files Turnmark wrote (exit " + p.exitValue() + ")");
        }
        nib = MiniJson.object(MiniJson.parse(new String(out, StandardCharsets.UTF_8)));
    }

    private static void needNibabel() throws InterruptedException {
        boolean ok;
        try {
            Process p = new ProcessBuilder(PYTHON, "-c", "import nibabel").redirectErrorStream(true).start();
            p.getInputStream().readAllBytes();
            ok = p.waitFor(120, TimeUnit.SECONDS) && p.exitValue() == 0;
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

    private static Map<String, Object> nibabel(String name) {
        return MiniJson.object(nib.get(dir.resolve(name).toString()));
    }

    private static void assertSameGeometry(Grid3 g, Map<String, Object> n) {
        double[] want = g.voxelToWorld().toRowMajor();
        assertArrayEquals(want, MiniJson.matrix(n.get("affine")), FLOAT32_AFFINE_TOL_MM, "nibabel img.affine");
        assertArrayEquals(want, MiniJson.matrix(n.get("qform")), FLOAT32_AFFINE_TOL_MM, "nibabel get_qform()");
        assertArrayEquals(want, MiniJson.matrix(n.get("sform")), FLOAT32_AFFINE_TOL_MM, "nibabel get_sform()");
        assertEquals(1.0, (Double) n.get("qform_code"));
        assertEquals(1.0, (Double) n.get("sform_code"));
        assertEquals("mm", n.get("spatial_unit"));
        assertEquals(ResearchUse.DESCRIP, n.get("descrip"));
    }

    private static void assertSameValues(float[] want, double[] got, int offset, String what) {
        for (int k = 0; k < want.length; k++) {
            if (want[k] != got[offset + k]) {
                fail(what + ": value " + k + " is " + got[offset + k] + " in nibabel, " + want[k] + " written");
            }
        }
    }

    @Test
    void float32VolumesReadTheSameInNibabel() {
        Map<String, Object> r = nibabel("right.nii.gz");
        Map<String, Object> l = nibabel("left.nii");
        assertArrayEquals(new double[] {7, 6, 5}, MiniJson.doubles(r.get("shape")));
        assertEquals("float32", r.get("datatype"));
        assertEquals(1.0, (Double) r.get("qfac"));
        assertEquals(-1.0, (Double) l.get("qfac"), "left-handed grid: qfac -1 (nifti1.h)");
        assertSameGeometry(rightGrid, r);
        assertSameGeometry(leftGrid, l);
        assertSameValues(f32Right, MiniJson.doubles(r.get("data")), 0, "float32 voxels");
        assertSameValues(f32Left, MiniJson.doubles(l.get("data")), 0, "float32 voxels");
    }

    @Test
    void integerVolumesReadTheSameInNibabel() {
        Map<String, Object> n16 = nibabel("i16.nii");
        Map<String, Object> n8 = nibabel("u8.nii.gz");
        assertEquals("int16", n16.get("datatype"));
        assertEquals("uint8", n8.get("datatype"));
        assertSameGeometry(leftGrid, n16);
        assertSameValues(i16, MiniJson.doubles(n16.get("data")), 0, "int16 voxels");
        assertSameValues(u8, MiniJson.doubles(n8.get("data")), 0, "uint8 voxels");
    }

    @Test
    void displacementFieldReadsTheSameInNibabel() {
        Map<String, Object> n = nibabel("u.nii.gz");
        // nifti1.h vector layout: dim[0] = 5, one time point, 3 components, planes in order x, y, z.
        assertArrayEquals(new double[] {7, 6, 5, 1, 3}, MiniJson.doubles(n.get("shape")));
        assertEquals(1006.0, (Double) n.get("intent_code"));
        assertEquals("supine->prone", n.get("intent_name"));
        assertSameGeometry(rightGrid, n);
        double[] data = MiniJson.doubles(n.get("data"));
        for (int c = 0; c < 3; c++) {
            assertSameValues(field.component(c), data, c * rightGrid.size(), "component " + c);
        }
    }

    @Test
    void turnmarkReadsANibabelFileAsNibabelDoes() {
        Map<String, Object> n = nibabel("nibabel.nii.gz");
        assertArrayEquals(MiniJson.matrix(n.get("affine")),
                turnmarkReadOfNibabelFile.header().voxelToWorld().toRowMajor(), 1e-9);
        assertSameValues(turnmarkReadOfNibabelFile.volume().data(), MiniJson.doubles(n.get("data")), 0, "float32 voxels");
    }
}
