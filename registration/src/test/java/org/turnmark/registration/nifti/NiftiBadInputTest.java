package org.turnmark.registration.nifti;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.zip.GZIPOutputStream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Bad input: each case must raise {@link NiftiFormatException} naming the file and the field, never
 * return a volume. Field offsets are those of {@code nifti1.h}.
 */
class NiftiBadInputTest {

    @TempDir
    Path dir;

    private final NiftiReader reader = new NiftiReader();

    /** A valid little-endian float32 4×3×2 image written by Turnmark (352 + 96 bytes). */
    private byte[] valid() throws IOException {
        Grid3 g = Grid3.axisAligned(4, 3, 2, 1, 1, 2, 0, 0, 0);
        float[] d = new float[g.size()];
        for (int n = 0; n < d.length; n++) {
            d[n] = n;
        }
        Path p = dir.resolve("valid.nii");
        NiftiWriter.writeVolume(p, new Volume(g, d));
        return Files.readAllBytes(p);
    }

    private static byte[] putShort(byte[] b, int off, int v) {
        ByteBuffer.wrap(b).order(ByteOrder.LITTLE_ENDIAN).putShort(off, (short) v);
        return b;
    }

    private static byte[] putFloat(byte[] b, int off, float v) {
        ByteBuffer.wrap(b).order(ByteOrder.LITTLE_ENDIAN).putFloat(off, v);
        return b;
    }

    private static byte[] gzip(byte[] b) throws IOException {
        ByteArrayOutputStream o = new ByteArrayOutputStream();
        try (GZIPOutputStream z = new GZIPOutputStream(o)) {
            z.write(b);
        }
        return o.toByteArray();
    }

    private NiftiFormatException rejectFile(String name, byte[] content) throws IOException {
        Path p = dir.resolve(name);
        Files.write(p, content);
        NiftiFormatException e = assertThrows(NiftiFormatException.class, () -> reader.readVolume(p));
        assertTrue(e.getMessage().contains(name), "message names the file: " + e.getMessage());
        return e;
    }

    @Test
    void missingFile() {
        Path p = dir.resolve("absent.nii.gz");
        NiftiFormatException e = assertThrows(NiftiFormatException.class, () -> reader.readVolume(p));
        assertEquals("file", e.field());
        assertTrue(e.getMessage().contains("absent.nii.gz") && e.getMessage().contains("not found"), e.getMessage());
    }

    @Test
    void truncatedHeader() throws IOException {
        NiftiFormatException e = rejectFile("short.nii", Arrays.copyOf(valid(), 200));
        assertEquals("header", e.field());
        assertTrue(e.getMessage().contains("348"), e.getMessage());
    }

    @Test
    void truncatedData() throws IOException {
        byte[] v = valid();
        NiftiFormatException e = rejectFile("cut.nii", Arrays.copyOf(v, v.length - 5));
        assertEquals("data", e.field());
        assertTrue(e.getMessage().contains("truncated"), e.getMessage());
    }

    @Test
    void truncatedGzipStream() throws IOException {
        byte[] z = gzip(valid());
        NiftiFormatException e = rejectFile("cut.nii.gz", Arrays.copyOf(z, z.length - 12));
        assertEquals("gzip stream", e.field());
    }

    @Test
    void corruptGzipChecksum() throws IOException {
        byte[] z = gzip(valid());
        z[z.length - 6] ^= 0x5A; // inside the CRC-32 of the gzip trailer (RFC 1952)
        NiftiFormatException e = rejectFile("crc.nii.gz", z);
        assertEquals("gzip stream", e.field());
        assertTrue(e.getMessage().contains("corrupt"), e.getMessage());
    }

    @Test
    void corruptDeflateData() throws IOException {
        byte[] z = gzip(valid());
        for (int n = 12; n < 40; n++) {
            z[n] = (byte) 0xFF;
        }
        assertEquals("gzip stream", rejectFile("bad.nii.gz", z).field());
    }

    @Test
    void wrongMagic() throws IOException {
        byte[] b = valid();
        b[344] = 0;
        b[345] = 0;
        b[346] = 0;
        NiftiFormatException e = rejectFile("nomagic.nii", b);
        assertEquals("magic", e.field());
    }

    @Test
    void niftiTwoIsNamed() throws IOException {
        byte[] b = valid();
        ByteBuffer.wrap(b).order(ByteOrder.LITTLE_ENDIAN).putInt(0, 540);
        NiftiFormatException e = rejectFile("two.nii", b);
        assertEquals("sizeof_hdr", e.field());
        assertTrue(e.getMessage().contains("NIfTI-2"), e.getMessage());
    }

    @Test
    void notNiftiAtAll() throws IOException {
        NiftiFormatException e = rejectFile("text.nii", "hello, this is not an image".repeat(20).getBytes());
        assertEquals("sizeof_hdr", e.field());
    }

    @Test
    void unknownDatatypeCode() throws IOException {
        NiftiFormatException e = rejectFile("dt.nii", putShort(valid(), 70, 99));
        assertEquals("datatype", e.field());
        assertTrue(e.getMessage().contains("unknown datatype code 99"), e.getMessage());
    }

    @Test
    void int64IsRejectedByName() throws IOException {
        NiftiFormatException e = rejectFile("i64.nii", putShort(valid(), 70, 1024));
        assertTrue(e.getMessage().contains("int64 (datatype 1024) is not supported"), e.getMessage());
    }

    @Test
    void zeroDimension() throws IOException {
        NiftiFormatException e = rejectFile("dim0.nii", putShort(valid(), 44, 0));
        assertEquals("dim[2]", e.field());
        assertTrue(e.getMessage().contains(">= 1, got 0"), e.getMessage());
    }

    @Test
    void negativeDimension() throws IOException {
        assertEquals("dim[3]", rejectFile("dimneg.nii", putShort(valid(), 46, -4)).field());
    }

    @Test
    void tooManyDimensions() throws IOException {
        assertEquals("dim[0]", rejectFile("rank.nii", putShort(valid(), 40, 9)).field());
    }

    @Test
    void headerNeedingMoreMemoryThanTheLimitIsRefusedBeforeReading() throws IOException {
        // 30000^3 voxels: far beyond any heap, and beyond a Java array.
        byte[] b = valid();
        putShort(b, 42, 30000);
        putShort(b, 44, 30000);
        putShort(b, 46, 30000);
        NiftiFormatException e = rejectFile("huge.nii", b);
        assertTrue(e.getMessage().contains("voxels"), e.getMessage());

        // A small image against a tiny limit: the limit is stated in the message.
        Path p = dir.resolve("small.nii");
        Files.write(p, valid());
        NiftiFormatException small = assertThrows(NiftiFormatException.class, () -> new NiftiReader(64).readVolume(p));
        assertTrue(small.getMessage().contains("limit of 64 bytes"), small.getMessage());
        assertTrue(small.getMessage().contains("96 bytes"), "states the need: " + small.getMessage());
    }

    @Test
    void zeroSpacingWithoutSform() throws IOException {
        byte[] b = putShort(valid(), 254, 0); // sform_code 0: the qform uses pixdim
        NiftiFormatException e = rejectFile("zerospacing.nii", putFloat(b, 80, 0f));
        assertEquals("pixdim[1]", e.field());
        assertTrue(e.getMessage().contains("> 0, got 0"), e.getMessage());
    }

    @Test
    void nonFiniteSpacing() throws IOException {
        byte[] b = putShort(putShort(valid(), 254, 0), 252, 0); // neither form: pixdim only
        assertEquals("pixdim[3]", rejectFile("nanspacing.nii", putFloat(b, 88, Float.NaN)).field());
    }

    @Test
    void singularSform() throws IOException {
        byte[] b = valid();
        for (int n = 0; n < 4; n++) {
            putFloat(b, 296 + 4 * n, 0f); // srow_y = 0
        }
        NiftiFormatException e = rejectFile("singular.nii", b);
        assertTrue(e.getMessage().contains("singular"), e.getMessage());
    }

    @Test
    void nonFiniteSformEntry() throws IOException {
        assertEquals("srow_z[3]", rejectFile("infsform.nii", putFloat(valid(), 324, Float.POSITIVE_INFINITY)).field());
    }

    @Test
    void nonFiniteInterceptWithSlope() throws IOException {
        byte[] b = putFloat(putFloat(valid(), 112, 2f), 116, Float.NaN);
        assertEquals("scl_inter", rejectFile("inter.nii", b).field());
    }

    @Test
    void frameOutOfRange() throws IOException {
        Path p = dir.resolve("one.nii");
        Files.write(p, valid());
        NiftiFormatException e = assertThrows(NiftiFormatException.class, () -> reader.readVolume(p, 1));
        assertEquals("dim[4]", e.field());
    }

    @Test
    void severalFramesNeedAChoice() {
        NiftiFormatException e = assertThrows(NiftiFormatException.class,
                () -> reader.readVolume(Fixtures.file("nibabel/functional.nii")));
        assertTrue(e.getMessage().contains("20 frames"), e.getMessage());
    }

    @Test
    void scalarAndVectorReadsRefuseTheOtherKind() throws IOException {
        Path scalar = dir.resolve("s.nii");
        Files.write(scalar, valid());
        assertEquals("dim[4..5]", assertThrows(NiftiFormatException.class, () -> reader.readVectorField(scalar)).field());
        Path vec = dir.resolve("v.nii");
        NiftiWriter.writeDisplacementField(vec, VectorField.zeros(Grid3.axisAligned(2, 2, 2, 1, 1, 1, 0, 0, 0)), "a->b");
        assertEquals("dim[5]", assertThrows(NiftiFormatException.class, () -> reader.readVolume(vec)).field());
    }

    @Test
    void directoryIsNotAFile() throws IOException {
        Path d = Files.createDirectory(dir.resolve("folder.nii"));
        assertEquals("file", assertThrows(NiftiFormatException.class, () -> reader.readVolume(d)).field());
    }

    @Test
    void imgWithoutHeader() throws IOException {
        Path img = dir.resolve("lonely.img");
        Files.write(img, new byte[96]);
        NiftiFormatException e = assertThrows(NiftiFormatException.class, () -> reader.readVolume(img));
        assertEquals("header file", e.field());
        assertTrue(e.getMessage().contains("lonely.hdr"), e.getMessage());
    }

    @Test
    void inMemoryReadOfPairHeaderIsRefused() {
        byte[] hdr = Fixtures.bytes("made/pair.hdr");
        byte[] padded = Arrays.copyOf(hdr, 352);
        assertEquals("magic", assertThrows(NiftiFormatException.class,
                () -> reader.readVolume(padded, "pair.hdr", 0)).field());
    }
}
