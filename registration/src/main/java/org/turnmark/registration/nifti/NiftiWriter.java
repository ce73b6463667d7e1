package org.turnmark.registration.nifti;

import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.Locale;
import java.util.zip.GZIPOutputStream;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Writes single-file NIfTI-1 images ({@code .nii}, or gzipped when the name ends in {@code .gz}):
 * scalar volumes as float32, int16 or uint8, and displacement fields as float32 with
 * {@code intent_code} 1006 (NIFTI_INTENT_DISPVECT), {@code dim} = [5, nx, ny, nz, 1, 3, 1, 1] and
 * the x, y, z components stored as consecutive planes (RAS, mm).
 *
 * <p>Header: little-endian, {@code vox_offset} 352, no extensions, {@code xyzt_units} = mm,
 * {@code scl_slope} 1 and {@code scl_inter} 0, {@code descrip} = {@link ResearchUse#DESCRIP}. The
 * sform holds the grid's voxel→world map ({@code sform_code} 1, scanner anatomical); the qform
 * holds the same map as a quaternion ({@code qform_code} 1, {@code qfac} −1 for a left-handed
 * grid) whenever the map's columns are orthogonal. A sheared map cannot be a qform: then
 * {@code qform_code} is 0 and only the sform is set.
 *
 * <p>Writes are atomic: the file is written to a temporary name in the target directory and moved
 * into place; on failure the temporary file is deleted and nothing appears under the final name.
 * Stateless and thread safe.
 */
public final class NiftiWriter {

    private static final int CHUNK_VOXELS = 1 << 18;

    private NiftiWriter() {
    }

    /** Writes {@code volume} as float32. */
    public static void writeVolume(Path path, Volume volume) throws IOException {
        writeVolume(path, volume, NiftiDatatype.FLOAT32);
    }

    /**
     * Writes a scalar volume.
     *
     * @param path     target, ending in {@code .nii} or {@code .nii.gz}; replaced if it exists
     * @param volume   the volume; not modified
     * @param datatype {@link NiftiDatatype#FLOAT32}, {@link NiftiDatatype#INT16} or
     *                 {@link NiftiDatatype#UINT8}; integer types need every value to be a whole
     *                 number in range (no silent rounding or clipping)
     * @throws IllegalArgumentException for another datatype, a non-finite value, or a value the
     *                                  integer type cannot hold exactly (message gives the voxel)
     */
    public static void writeVolume(Path path, Volume volume, NiftiDatatype datatype) throws IOException {
        checkName(path);
        if (datatype != NiftiDatatype.FLOAT32 && datatype != NiftiDatatype.INT16 && datatype != NiftiDatatype.UINT8) {
            throw new IllegalArgumentException("can write float32, int16 or uint8 volumes, not " + datatype.label());
        }
        Grid3 g = volume.grid();
        checkValues(volume.data(), g, datatype, path, "");
        int[] dim = {3, g.nx(), g.ny(), g.nz(), 1, 1, 1, 1};
        byte[] header = header(g.voxelToWorld(), dim, datatype, 0, "");
        write(path, header, new float[][] {volume.data()}, datatype);
    }

    /**
     * Writes a displacement field (RAS components, mm) with {@code intent_code} 1006.
     *
     * @param intentName states the direction of the map, e.g. {@code "supine->prone"}: printable
     *                   ASCII, 1..15 characters (NIfTI cannot say which way a displacement maps)
     * @throws IllegalArgumentException for a bad intent name or non-finite components
     */
    public static void writeDisplacementField(Path path, VectorField field, String intentName) throws IOException {
        checkName(path);
        if (intentName == null || intentName.isEmpty() || intentName.length() > 15
                || !intentName.chars().allMatch(ch -> ch >= 32 && ch < 127)) {
            throw new IllegalArgumentException("intent name must be 1..15 printable ASCII characters stating the "
                    + "direction of the displacement, got \"" + intentName + "\"");
        }
        Grid3 g = field.grid();
        for (int c = 0; c < 3; c++) {
            checkValues(field.component(c), g, NiftiDatatype.FLOAT32, path, " component " + "xyz".charAt(c));
        }
        int[] dim = {5, g.nx(), g.ny(), g.nz(), 1, 3, 1, 1};
        byte[] header = header(g.voxelToWorld(), dim, NiftiDatatype.FLOAT32, NiftiHeader.INTENT_DISPVECT, intentName);
        write(path, header, new float[][] {field.x(), field.y(), field.z()}, NiftiDatatype.FLOAT32);
    }

    private static void checkName(Path path) {
        String n = String.valueOf(path.getFileName()).toLowerCase(Locale.ROOT);
        if (!n.endsWith(".nii") && !n.endsWith(".nii.gz")) {
            throw new IllegalArgumentException("NIfTI output name must end in .nii or .nii.gz, got " + path);
        }
    }

    private static void checkValues(float[] data, Grid3 g, NiftiDatatype t, Path path, String what) {
        double lo = t == NiftiDatatype.INT16 ? Short.MIN_VALUE : 0;
        double hi = t == NiftiDatatype.INT16 ? Short.MAX_VALUE : 255;
        for (int n = 0; n < data.length; n++) {
            float v = data[n];
            boolean ok = Float.isFinite(v)
                    && (t == NiftiDatatype.FLOAT32 || (v == Math.rint(v) && v >= lo && v <= hi));
            if (!ok) {
                int i = n % g.nx();
                int j = (n / g.nx()) % g.ny();
                int k = n / (g.nx() * g.ny());
                throw new IllegalArgumentException("cannot write " + path + ": voxel (" + i + ", " + j + ", " + k
                        + ")" + what + " is " + v + ", expected "
                        + (t == NiftiDatatype.FLOAT32 ? "a finite value"
                        : "a whole number in " + (long) lo + ".." + (long) hi + " for " + t.label()));
            }
        }
    }

    /** Encodes the 348-byte header plus the 4-byte extension flag (all zero: no extensions). */
    static byte[] header(Affine3D voxelToWorld, int[] dim, NiftiDatatype t, int intentCode, String intentName) {
        ByteBuffer b = ByteBuffer.allocate(NiftiHeader.MIN_SINGLE_FILE_OFFSET).order(ByteOrder.LITTLE_ENDIAN);
        b.putInt(0, NiftiHeader.HEADER_SIZE);
        for (int n = 0; n < 8; n++) {
            b.putShort(40 + 2 * n, (short) dim[n]);
        }
        b.putShort(68, (short) intentCode);
        b.putShort(70, (short) t.code());
        b.putShort(72, (short) t.bitpix());
        boolean orthogonal = NiftiQuaternion.hasOrthogonalColumns(voxelToWorld);
        double[] pix = {1, voxelToWorld.columnNorm(0), voxelToWorld.columnNorm(1), voxelToWorld.columnNorm(2), 1, 1, 1, 1};
        NiftiQuaternion.Params q = orthogonal ? NiftiQuaternion.fromAffine(voxelToWorld) : null;
        if (q != null) {
            pix[0] = q.qfac();
        }
        for (int n = 0; n < 8; n++) {
            b.putFloat(76 + 4 * n, (float) pix[n]);
        }
        b.putFloat(108, NiftiHeader.MIN_SINGLE_FILE_OFFSET);
        b.putFloat(112, 1f);
        b.putFloat(116, 0f);
        b.put(123, (byte) 2); // xyzt_units: NIFTI_UNITS_MM
        putString(b, 148, 80, ResearchUse.DESCRIP);
        b.putShort(252, (short) (q != null ? NiftiHeader.XFORM_SCANNER_ANAT : 0));
        b.putShort(254, (short) NiftiHeader.XFORM_SCANNER_ANAT);
        if (q != null) {
            b.putFloat(256, (float) q.b());
            b.putFloat(260, (float) q.c());
            b.putFloat(264, (float) q.d());
            b.putFloat(268, (float) q.qoffsetX());
            b.putFloat(272, (float) q.qoffsetY());
            b.putFloat(276, (float) q.qoffsetZ());
        }
        double[] m = voxelToWorld.toRowMajor();
        for (int n = 0; n < 12; n++) {
            b.putFloat(280 + 4 * n, (float) m[n]);
        }
        putString(b, 328, 16, intentName);
        putString(b, 344, 4, "n+1");
        return b.array();
    }

    private static void putString(ByteBuffer b, int off, int len, String s) {
        byte[] a = s.getBytes(StandardCharsets.US_ASCII);
        for (int n = 0; n < Math.min(a.length, len - 1); n++) {
            b.put(off + n, a[n]);
        }
    }

    private static void write(Path path, byte[] header, float[][] planes, NiftiDatatype t) throws IOException {
        Path abs = path.toAbsolutePath();
        Path dir = abs.getParent();
        Path tmp = Files.createTempFile(dir, "." + abs.getFileName() + ".", ".tmp");
        boolean moved = false;
        try {
            try (OutputStream file = Files.newOutputStream(tmp);
                 OutputStream out = abs.getFileName().toString().toLowerCase(Locale.ROOT).endsWith(".gz")
                         ? new GZIPOutputStream(new BufferedOutputStream(file, 1 << 16), 1 << 16)
                         : new BufferedOutputStream(file, 1 << 16)) {
                out.write(header);
                writeData(out, planes, t);
            }
            Files.move(tmp, abs, StandardCopyOption.ATOMIC_MOVE);
            moved = true;
        } finally {
            if (!moved) {
                Files.deleteIfExists(tmp);
            }
        }
    }

    private static void writeData(OutputStream out, float[][] planes, NiftiDatatype t) throws IOException {
        int bpv = t.bytesPerVoxel();
        ByteBuffer bb = ByteBuffer.allocate(CHUNK_VOXELS * bpv).order(ByteOrder.LITTLE_ENDIAN);
        for (float[] p : planes) {
            for (int start = 0; start < p.length; start += CHUNK_VOXELS) {
                int count = Math.min(CHUNK_VOXELS, p.length - start);
                bb.clear();
                switch (t) {
                    case FLOAT32:
                        for (int n = 0; n < count; n++) {
                            bb.putFloat(4 * n, p[start + n]);
                        }
                        break;
                    case INT16:
                        for (int n = 0; n < count; n++) {
                            bb.putShort(2 * n, (short) p[start + n]);
                        }
                        break;
                    case UINT8:
                        for (int n = 0; n < count; n++) {
                            bb.put(n, (byte) (int) p[start + n]);
                        }
                        break;
                    default:
                        throw new IllegalStateException("unwritable datatype " + t);
                }
                out.write(bb.array(), 0, count * bpv);
            }
        }
    }
}
