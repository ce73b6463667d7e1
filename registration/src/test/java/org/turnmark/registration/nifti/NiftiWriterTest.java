package org.turnmark.registration.nifti;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Random;
import java.util.stream.Collectors;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/** Writing and reading back within Turnmark; the nibabel side is {@link NiftiNibabelRoundTripTest}. */
class NiftiWriterTest {

    /**
     * Affines are stored as float32: one rounding of each entry, 2^-24 relative, on entries up to
     * ~120 mm gives ≤ 1e-5 mm.
     */
    private static final double FLOAT32_AFFINE_TOL_MM = 1e-5;

    @TempDir
    Path dir;

    static Grid3 obliqueGrid(boolean leftHanded) {
        Affine3D rot = Affine3D.rotation(0.3, -1, 0.5, 0.7);
        Affine3D a = Affine3D.translation(-100.5, 20.25, 33).compose(rot)
                .compose(Affine3D.scaling(0.75, 1.25, leftHanded ? -2.5 : 2.5));
        return new Grid3(7, 6, 5, a);
    }

    static float[] ramp(int n, Random rnd, boolean integral, float lo, float hi) {
        float[] d = new float[n];
        for (int i = 0; i < n; i++) {
            float v = lo + (hi - lo) * rnd.nextFloat();
            d[i] = integral ? Math.round(v) : v;
        }
        d[0] = lo;
        d[n - 1] = hi;
        return d;
    }

    @Test
    void float32VolumeReadsBackExactly() throws IOException {
        Grid3 g = obliqueGrid(true);
        float[] d = ramp(g.size(), new Random(1), false, -1e4f, 3e5f);
        Path p = dir.resolve("f.nii.gz");
        NiftiWriter.writeVolume(p, new Volume(g, d));
        NiftiVolume back = new NiftiReader().readVolume(p);
        assertArrayEquals(d, back.volume().data());
        assertEquals(0, g.voxelToWorld().maxAbsDifference(back.header().voxelToWorld()), FLOAT32_AFFINE_TOL_MM);
        assertEquals(TransformSource.SFORM, back.header().transformSource());
        assertTrue(back.warnings().isEmpty(), "qform and sform agree: " + back.warnings());
        assertEquals(ResearchUse.DESCRIP, back.header().descrip());
        assertEquals(2, back.header().xyztUnits());
        assertEquals(-1.0, back.header().pixdim()[0], "qfac for a left-handed grid");
    }

    @Test
    void qformAloneGivesTheSameGeometry() throws IOException {
        Grid3 g = obliqueGrid(false);
        Path p = dir.resolve("q.nii");
        NiftiWriter.writeVolume(p, Volume.zeros(g));
        NiftiHeader h = new NiftiReader().readHeader(p);
        assertEquals(NiftiHeader.XFORM_SCANNER_ANAT, h.qformCode());
        assertEquals(NiftiHeader.XFORM_SCANNER_ANAT, h.sformCode());
        assertEquals(0, h.qform().orElseThrow().maxAbsDifference(h.sform().orElseThrow()), FLOAT32_AFFINE_TOL_MM);
    }

    @Test
    void integerTypesHoldWholeNumbersExactly() throws IOException {
        Grid3 g = obliqueGrid(false);
        for (NiftiDatatype t : new NiftiDatatype[] {NiftiDatatype.INT16, NiftiDatatype.UINT8}) {
            float lo = t == NiftiDatatype.INT16 ? -32768 : 0;
            float hi = t == NiftiDatatype.INT16 ? 32767 : 255;
            float[] d = ramp(g.size(), new Random(2), true, lo, hi);
            Path p = dir.resolve(t.label() + ".nii");
            NiftiWriter.writeVolume(p, new Volume(g, d), t);
            NiftiVolume back = new NiftiReader().readVolume(p);
            assertEquals(t, back.header().datatype());
            assertArrayEquals(d, back.volume().data());
            assertEquals(352 + g.size() * t.bytesPerVoxel(), Files.size(p));
        }
    }

    @Test
    void valuesAnIntegerTypeCannotHoldAreRefusedWithTheVoxel() {
        Grid3 g = Grid3.axisAligned(3, 3, 3, 1, 1, 1, 0, 0, 0);
        float[] d = new float[g.size()];
        d[g.index(1, 2, 0)] = 256;
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> NiftiWriter.writeVolume(dir.resolve("u8.nii"), new Volume(g, d), NiftiDatatype.UINT8));
        assertTrue(e.getMessage().contains("(1, 2, 0)") && e.getMessage().contains("256"), e.getMessage());
        d[g.index(1, 2, 0)] = 0.5f;
        assertThrows(IllegalArgumentException.class,
                () -> NiftiWriter.writeVolume(dir.resolve("i16.nii"), new Volume(g, d), NiftiDatatype.INT16));
        d[g.index(1, 2, 0)] = Float.NaN;
        assertThrows(IllegalArgumentException.class, () -> NiftiWriter.writeVolume(dir.resolve("f.nii"), new Volume(g, d)));
        assertEquals(List.of(), listing());
    }

    @Test
    void displacementFieldLayoutAndIntent() throws IOException {
        Grid3 g = obliqueGrid(false);
        Random rnd = new Random(3);
        VectorField f = new VectorField(g, ramp(g.size(), rnd, false, -5, 5), ramp(g.size(), rnd, false, -6, 6),
                ramp(g.size(), rnd, false, -7, 7));
        Path p = dir.resolve("u.nii.gz");
        NiftiWriter.writeDisplacementField(p, f, "prone->supine");
        NiftiVectorField back = new NiftiReader().readVectorField(p);
        NiftiHeader h = back.header();
        assertArrayEquals(new int[] {5, 7, 6, 5, 1, 3, 1, 1}, h.dim());
        assertEquals(NiftiHeader.INTENT_DISPVECT, h.intentCode());
        assertEquals("prone->supine", h.intentName());
        for (int c = 0; c < 3; c++) {
            assertArrayEquals(f.component(c), back.field().component(c), "component " + c);
        }
        assertTrue(back.warnings().isEmpty(), back.warnings().toString());
    }

    @Test
    void intentNameMustFitAndBeAscii() {
        VectorField f = VectorField.zeros(Grid3.axisAligned(2, 2, 2, 1, 1, 1, 0, 0, 0));
        assertThrows(IllegalArgumentException.class,
                () -> NiftiWriter.writeDisplacementField(dir.resolve("a.nii"), f, "sixteen chars!!!"));
        assertThrows(IllegalArgumentException.class, () -> NiftiWriter.writeDisplacementField(dir.resolve("a.nii"), f, ""));
    }

    @Test
    void shearedGridWritesSformOnly() throws IOException {
        Grid3 g = new Grid3(3, 3, 3, new Affine3D(1, 0.4, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0));
        Path p = dir.resolve("shear.nii");
        NiftiWriter.writeVolume(p, Volume.zeros(g));
        NiftiHeader h = new NiftiReader().readHeader(p);
        assertEquals(0, h.qformCode());
        assertEquals(0, g.voxelToWorld().maxAbsDifference(h.voxelToWorld()), FLOAT32_AFFINE_TOL_MM);
    }

    @Test
    void failedWriteLeavesNoFileAndNoTemporary() throws IOException {
        // The final name is a non-empty directory, so the atomic move fails after the data were written.
        Path target = Files.createDirectory(dir.resolve("taken.nii"));
        Files.writeString(target.resolve("keep.txt"), "x");
        Grid3 g = Grid3.axisAligned(2, 2, 2, 1, 1, 1, 0, 0, 0);
        assertThrows(IOException.class, () -> NiftiWriter.writeVolume(target, Volume.zeros(g)));
        assertEquals(List.of("taken.nii"), listing());
        assertTrue(Files.isDirectory(target));
    }

    @Test
    void existingFileIsReplacedWhole() throws IOException {
        Path p = dir.resolve("r.nii");
        Files.writeString(p, "old content");
        Grid3 g = Grid3.axisAligned(2, 2, 2, 1, 1, 1, 0, 0, 0);
        NiftiWriter.writeVolume(p, Volume.zeros(g));
        assertEquals(352 + 8 * 4, Files.size(p));
        assertEquals(List.of("r.nii"), listing());
    }

    @Test
    void nameMustBeNifti() {
        assertThrows(IllegalArgumentException.class,
                () -> NiftiWriter.writeVolume(dir.resolve("x.img"), Volume.zeros(Grid3.axisAligned(1, 1, 1, 1, 1, 1, 0, 0, 0))));
        assertFalse(Files.exists(dir.resolve("x.img")));
    }

    private List<String> listing() {
        try (Stream<Path> s = Files.list(dir)) {
            return s.map(p -> p.getFileName().toString()).sorted().collect(Collectors.toList());
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
