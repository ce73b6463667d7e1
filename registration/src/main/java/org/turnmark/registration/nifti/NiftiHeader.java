package org.turnmark.registration.nifti;

import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.Locale;
import java.util.Optional;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;

/**
 * A validated NIfTI-1 header ({@code nifti1.h}): the raw fields Turnmark uses and the geometry
 * derived from them.
 *
 * <p>Geometry rules: the voxel→world map is the sform when {@code sform_code} &gt; 0, else the
 * qform ({@link NiftiQuaternion}) when {@code qform_code} &gt; 0, else plain scaling by
 * {@code pixdim[1..3]} (NIfTI "Method 1"). World coordinates are converted to millimetres from the
 * spatial unit in {@code xyzt_units} (m, mm, µm; an unset unit is taken as mm with a warning). A
 * warning is recorded when both sform and qform are set and disagree by more than
 * {@link #SFORM_QFORM_TOLERANCE_MM} at a grid corner. Voxel indices address voxel centres; world
 * is RAS+ mm. Immutable and thread safe.
 */
public final class NiftiHeader {

    /** Size of the NIfTI-1 header in bytes ({@code sizeof_hdr}). */
    public static final int HEADER_SIZE = 348;
    /** Smallest {@code vox_offset} of a single-file image: header plus the 4-byte extension flag. */
    public static final int MIN_SINGLE_FILE_OFFSET = 352;
    /** {@code intent_code} of a displacement vector field (NIFTI_INTENT_DISPVECT). */
    public static final int INTENT_DISPVECT = 1006;
    /** {@code intent_code} of a generic vector field (NIFTI_INTENT_VECTOR). */
    public static final int INTENT_VECTOR = 1007;
    /** {@code qform_code}/{@code sform_code} for scanner-based anatomical coordinates. */
    public static final int XFORM_SCANNER_ANAT = 1;

    /**
     * Largest distance (mm) between sform and qform positions of a grid corner that is not
     * reported: well above float32 rounding of the header fields (about 1e-5 mm at 200 mm) and the
     * small-a rule of the quaternion (about 1e-4 mm), well below any voxel size in use.
     */
    public static final double SFORM_QFORM_TOLERANCE_MM = 0.01;

    /**
     * Smallest |det| of the voxel→world linear part relative to the product of its column lengths
     * (1 for orthogonal columns): below it the axes are so nearly coplanar that the map is treated
     * as singular.
     */
    public static final double MIN_RELATIVE_DETERMINANT = 1e-6;

    private final String source;
    private final ByteOrder byteOrder;
    private final boolean singleFile;
    private final int[] dim;
    private final int intentCode;
    private final String intentName;
    private final NiftiDatatype datatype;
    private final int bitpix;
    private final double[] pixdim;
    private final long voxOffset;
    private final double sclSlope;
    private final double sclInter;
    private final int xyztUnits;
    private final double spatialUnitMm;
    private final String descrip;
    private final int qformCode;
    private final int sformCode;
    private final Affine3D qformMm;
    private final Affine3D sformMm;
    private final Affine3D voxelToWorld;
    private final TransformSource transformSource;
    private final List<String> warnings;

    private NiftiHeader(Parsed p) {
        this.source = p.source;
        this.byteOrder = p.order;
        this.singleFile = p.singleFile;
        this.dim = p.dim;
        this.intentCode = p.intentCode;
        this.intentName = p.intentName;
        this.datatype = p.datatype;
        this.bitpix = p.bitpix;
        this.pixdim = p.pixdim;
        this.voxOffset = p.voxOffset;
        this.sclSlope = p.sclSlope;
        this.sclInter = p.sclInter;
        this.xyztUnits = p.xyztUnits;
        this.spatialUnitMm = p.unitMm;
        this.descrip = p.descrip;
        this.qformCode = p.qformCode;
        this.sformCode = p.sformCode;
        this.qformMm = p.qformMm;
        this.sformMm = p.sformMm;
        this.voxelToWorld = p.voxelToWorld;
        this.transformSource = p.transformSource;
        this.warnings = Collections.unmodifiableList(new ArrayList<>(p.warnings));
    }

    /** The file the header came from, as shown in messages. */
    public String source() {
        return source;
    }

    /** Byte order of header and data, detected from {@code sizeof_hdr}. */
    public ByteOrder byteOrder() {
        return byteOrder;
    }

    /** True for magic {@code "n+1"} (data in the same file), false for {@code "ni1"} (.hdr/.img pair). */
    public boolean isSingleFile() {
        return singleFile;
    }

    /** {@code dim[0..7]} as a new array; entries past {@code dim[0]} are reported as 1. */
    public int[] dim() {
        return dim.clone();
    }

    /** Number of spatial dimensions used ({@code dim[0]}, 1..7). */
    public int rank() {
        return dim[0];
    }

    public int nx() {
        return dim[1];
    }

    public int ny() {
        return dim[2];
    }

    public int nz() {
        return dim[3];
    }

    /** Number of time points/frames ({@code dim[4]}). */
    public int frames() {
        return dim[4];
    }

    /** Number of vector components per voxel ({@code dim[5]}). */
    public int components() {
        return dim[5];
    }

    /** Voxels in one 3-D frame, nx·ny·nz. */
    public long voxelsPerFrame() {
        return (long) dim[1] * dim[2] * dim[3];
    }

    /** True if the image is a 3-component vector field ({@code dim[5]} = 3, one frame). */
    public boolean isVectorField() {
        return dim[5] == 3 && dim[4] == 1 && dim[6] == 1 && dim[7] == 1;
    }

    public int intentCode() {
        return intentCode;
    }

    /** {@code intent_name}, trimmed at the first NUL. */
    public String intentName() {
        return intentName;
    }

    public NiftiDatatype datatype() {
        return datatype;
    }

    public int bitpix() {
        return bitpix;
    }

    /** {@code pixdim[0..7]} as stored (header units), as a new array. */
    public double[] pixdim() {
        return pixdim.clone();
    }

    /** Byte offset of the voxel data in the data file. */
    public long voxOffset() {
        return voxOffset;
    }

    /**
     * True if stored values are scaled: {@code scl_slope} finite and non-zero, and not the identity
     * (slope 1 with intercept 0).
     */
    public boolean isScaled() {
        return sclSlope != 0 && Double.isFinite(sclSlope) && !(sclSlope == 1 && sclInter == 0);
    }

    /** Effective slope: {@code scl_slope} if {@link #isScaled()}, else 1. */
    public double slope() {
        return isScaled() ? sclSlope : 1.0;
    }

    /** Effective intercept: {@code scl_inter} if {@link #isScaled()}, else 0. */
    public double intercept() {
        return isScaled() ? sclInter : 0.0;
    }

    public int xyztUnits() {
        return xyztUnits;
    }

    /** Millimetres per header spatial unit (1000 for m, 1 for mm or unset, 0.001 for µm). */
    public double spatialUnitMm() {
        return spatialUnitMm;
    }

    /** {@code descrip}, trimmed at the first NUL. */
    public String descrip() {
        return descrip;
    }

    public int qformCode() {
        return qformCode;
    }

    public int sformCode() {
        return sformCode;
    }

    /** The qform's voxel→world map in mm, if {@code qform_code} &gt; 0 and its fields are usable. */
    public Optional<Affine3D> qform() {
        return Optional.ofNullable(qformMm);
    }

    /** The sform's voxel→world map in mm, if {@code sform_code} &gt; 0. */
    public Optional<Affine3D> sform() {
        return Optional.ofNullable(sformMm);
    }

    /** Voxel index → RAS+ mm (voxel centres), from {@link #transformSource()}. */
    public Affine3D voxelToWorld() {
        return voxelToWorld;
    }

    /** RAS+ mm → voxel index. */
    public Affine3D worldToVoxel() {
        return voxelToWorld.inverse();
    }

    public TransformSource transformSource() {
        return transformSource;
    }

    /** Orientation letters of the voxel axes, e.g. "RAS" or "LPS". */
    public String orientation() {
        return voxelToWorld.orientationLetters();
    }

    /** Voxel spacing along i, j, k in mm (column lengths of {@link #voxelToWorld()}). */
    public double[] spacingMm() {
        return new double[] {voxelToWorld.columnNorm(0), voxelToWorld.columnNorm(1), voxelToWorld.columnNorm(2)};
    }

    /** The 3-D grid of one frame. */
    public Grid3 grid() {
        return new Grid3(dim[1], dim[2], dim[3], voxelToWorld);
    }

    /** Things a careful reader should know (units assumed, sform/qform disagreement, ...). */
    public List<String> warnings() {
        return warnings;
    }

    // ------------------------------------------------------------------------------------------
    // Parsing

    /** Mutable scratch used while parsing. */
    private static final class Parsed {
        String source;
        ByteOrder order;
        boolean singleFile;
        int[] dim = new int[8];
        int intentCode;
        String intentName;
        NiftiDatatype datatype;
        int bitpix;
        double[] pixdim = new double[8];
        long voxOffset;
        double sclSlope;
        double sclInter;
        int xyztUnits;
        double unitMm;
        String descrip;
        int qformCode;
        int sformCode;
        Affine3D qformMm;
        Affine3D sformMm;
        Affine3D voxelToWorld;
        TransformSource transformSource;
        List<String> warnings = new ArrayList<>();
    }

    /**
     * Parses and validates the first {@link #HEADER_SIZE} bytes of a NIfTI-1 header.
     *
     * @param bytes  at least 348 bytes; not modified
     * @param source file name for messages
     * @throws NiftiFormatException for anything Turnmark cannot read correctly
     */
    static NiftiHeader parse(byte[] bytes, String source) throws NiftiFormatException {
        if (bytes.length < HEADER_SIZE) {
            throw new NiftiFormatException(source, "header", Integer.toString(bytes.length),
                    "file is truncated: a NIfTI-1 header needs " + HEADER_SIZE + " bytes, got " + bytes.length);
        }
        Parsed p = new Parsed();
        p.source = source;
        ByteBuffer bb = ByteBuffer.wrap(bytes, 0, HEADER_SIZE).order(ByteOrder.LITTLE_ENDIAN);
        int sizeofHdr = bb.getInt(0);
        if (sizeofHdr == HEADER_SIZE) {
            p.order = ByteOrder.LITTLE_ENDIAN;
        } else if (Integer.reverseBytes(sizeofHdr) == HEADER_SIZE) {
            p.order = ByteOrder.BIG_ENDIAN;
        } else if (sizeofHdr == 540 || Integer.reverseBytes(sizeofHdr) == 540) {
            throw new NiftiFormatException(source, "sizeof_hdr", "540",
                    "this is a NIfTI-2 header (sizeof_hdr 540); only NIfTI-1 (348) is supported");
        } else {
            throw new NiftiFormatException(source, "sizeof_hdr", Integer.toString(sizeofHdr),
                    "expected 348 in either byte order, got " + sizeofHdr + ": not a NIfTI-1 file");
        }
        bb.order(p.order);
        readMagic(bytes, p);
        readDims(bb, p);
        readDatatype(bb, p);
        for (int n = 0; n < 8; n++) {
            p.pixdim[n] = bb.getFloat(76 + 4 * n);
        }
        readOffsetAndScaling(bb, p);
        p.intentCode = bb.getShort(68);
        p.intentName = cString(bytes, 328, 16);
        p.descrip = cString(bytes, 148, 80);
        readUnits(bytes, p);
        readGeometry(bb, p);
        return new NiftiHeader(p);
    }

    private static void readMagic(byte[] b, Parsed p) throws NiftiFormatException {
        String shown = printable(b, 344, 4);
        if (b[344] == 'n' && b[345] == '+' && b[346] == '1' && b[347] == 0) {
            p.singleFile = true;
        } else if (b[344] == 'n' && b[345] == 'i' && b[346] == '1' && b[347] == 0) {
            p.singleFile = false;
        } else if (b[344] == 'n' && (b[345] == '+' || b[345] == 'i') && b[346] == '2') {
            throw new NiftiFormatException(p.source, "magic", shown,
                    "NIfTI-2 magic \"" + shown + "\" at byte 344; only NIfTI-1 is supported");
        } else {
            throw new NiftiFormatException(p.source, "magic", shown,
                    "no NIfTI-1 magic at byte 344 (expected \"n+1\" or \"ni1\", found \"" + shown
                    + "\"); ANALYZE 7.5 headers without NIfTI magic are not supported");
        }
    }

    private static void readDims(ByteBuffer bb, Parsed p) throws NiftiFormatException {
        int rank = bb.getShort(40);
        if (rank < 1 || rank > 7) {
            throw new NiftiFormatException(p.source, "dim[0]", Integer.toString(rank),
                    "number of dimensions must be 1..7, got " + rank);
        }
        p.dim[0] = rank;
        for (int n = 1; n < 8; n++) {
            int v = bb.getShort(40 + 2 * n);
            if (n <= rank) {
                if (v < 1) {
                    throw new NiftiFormatException(p.source, "dim[" + n + "]", Integer.toString(v),
                            "image size must be >= 1, got " + v);
                }
                p.dim[n] = v;
            } else {
                p.dim[n] = 1;
            }
        }
    }

    private static void readDatatype(ByteBuffer bb, Parsed p) throws NiftiFormatException {
        int code = bb.getShort(70);
        NiftiDatatype t = NiftiDatatype.fromCode(code);
        if (t == null) {
            throw new NiftiFormatException(p.source, "datatype", Integer.toString(code),
                    "unknown datatype code " + code + "; supported: " + supportedTypes());
        }
        if (!t.isReadable()) {
            throw new NiftiFormatException(p.source, "datatype", Integer.toString(code),
                    t.label() + " (datatype " + code + ") is not supported; supported: " + supportedTypes());
        }
        p.datatype = t;
        p.bitpix = bb.getShort(72);
        if (p.bitpix != t.bitpix()) {
            p.warnings.add("bitpix is " + p.bitpix + " but datatype " + t.label() + " has " + t.bitpix()
                    + " bits; the datatype was used");
        }
    }

    private static String supportedTypes() {
        StringBuilder sb = new StringBuilder();
        for (NiftiDatatype t : NiftiDatatype.values()) {
            if (t.isReadable()) {
                sb.append(sb.length() == 0 ? "" : ", ").append(t.label());
            }
        }
        return sb.toString();
    }

    private static void readOffsetAndScaling(ByteBuffer bb, Parsed p) throws NiftiFormatException {
        double off = bb.getFloat(108);
        if (!Double.isFinite(off) || off < 0 || off != Math.rint(off) || off > Integer.MAX_VALUE) {
            throw new NiftiFormatException(p.source, "vox_offset", fmt(off),
                    "data offset must be a whole number of bytes >= 0, got " + fmt(off));
        }
        p.voxOffset = (long) off;
        if (p.singleFile && p.voxOffset < MIN_SINGLE_FILE_OFFSET) {
            p.warnings.add("vox_offset " + p.voxOffset + " is below " + MIN_SINGLE_FILE_OFFSET
                    + " for a single-file image; data were read from byte " + MIN_SINGLE_FILE_OFFSET);
            p.voxOffset = MIN_SINGLE_FILE_OFFSET;
        }
        p.sclSlope = bb.getFloat(112);
        p.sclInter = bb.getFloat(116);
        if (p.sclSlope != 0 && Double.isFinite(p.sclSlope) && !Double.isFinite(p.sclInter)) {
            throw new NiftiFormatException(p.source, "scl_inter", fmt(p.sclInter),
                    "intercept must be finite when scl_slope (" + fmt(p.sclSlope) + ") is set, got "
                    + fmt(p.sclInter));
        }
    }

    private static void readUnits(byte[] b, Parsed p) throws NiftiFormatException {
        p.xyztUnits = b[123] & 0xFF;
        int space = p.xyztUnits & 0x07;
        switch (space) {
            case 0:
                p.unitMm = 1.0;
                p.warnings.add("spatial unit not set (xyzt_units & 7 = 0); millimetres assumed");
                break;
            case 1:
                p.unitMm = 1000.0;
                break;
            case 2:
                p.unitMm = 1.0;
                break;
            case 3:
                p.unitMm = 0.001;
                break;
            default:
                throw new NiftiFormatException(p.source, "xyzt_units", Integer.toString(p.xyztUnits),
                        "spatial unit code " + space + " is undefined (expected 1 m, 2 mm or 3 um)");
        }
    }

    private static void readGeometry(ByteBuffer bb, Parsed p) throws NiftiFormatException {
        p.qformCode = bb.getShort(252);
        p.sformCode = bb.getShort(254);
        if (p.qformCode > 4) {
            p.warnings.add("qform_code " + p.qformCode + " is not defined by the standard (0..4)");
        }
        if (p.sformCode > 4) {
            p.warnings.add("sform_code " + p.sformCode + " is not defined by the standard (0..4)");
        }
        if (p.sformCode > 0) {
            double[] s = new double[12];
            for (int n = 0; n < 12; n++) {
                s[n] = bb.getFloat(280 + 4 * n);
                if (!Double.isFinite(s[n])) {
                    throw new NiftiFormatException(p.source, "srow_" + "xyz".charAt(n / 4) + "[" + n % 4 + "]",
                            fmt(s[n]), "sform entries must be finite, got " + fmt(s[n]));
                }
                s[n] *= p.unitMm;
                if (!Double.isFinite(s[n])) {
                    throw new NiftiFormatException(p.source, "srow_" + "xyz".charAt(n / 4) + "[" + n % 4 + "]",
                            fmt(s[n] / p.unitMm), "sform entry overflows when converted to mm");
                }
            }
            p.sformMm = Affine3D.fromRowMajor(s);
            checkInvertible(p.sformMm, p.source, "srow_x/y/z (sform)");
        }
        if (p.qformCode > 0) {
            try {
                p.qformMm = qform(bb, p);
            } catch (NiftiFormatException e) {
                if (p.sformMm == null) {
                    throw e;
                }
                p.warnings.add("qform is unusable (" + e.getMessage() + "); the sform was used");
            }
        }
        if (p.sformMm != null) {
            p.voxelToWorld = p.sformMm;
            p.transformSource = TransformSource.SFORM;
            if (p.qformMm != null) {
                double d = maxCornerDistance(p.sformMm, p.qformMm, p.dim);
                if (d > SFORM_QFORM_TOLERANCE_MM) {
                    p.warnings.add(String.format(Locale.ROOT,
                            "sform and qform disagree by up to %.4g mm at the grid corners; the sform was used", d));
                }
            }
        } else if (p.qformMm != null) {
            p.voxelToWorld = p.qformMm;
            p.transformSource = TransformSource.QFORM;
        } else {
            checkSpacing(p);
            double u = p.unitMm;
            try {
                p.voxelToWorld = Affine3D.scaling(p.pixdim[1] * u, p.pixdim[2] * u, p.pixdim[3] * u);
            } catch (IllegalArgumentException e) {
                throw new NiftiFormatException(p.source, "pixdim", "", "spacing overflows when converted to mm", e);
            }
            p.transformSource = TransformSource.PIXDIM;
            p.warnings.add("no sform or qform (both codes 0): voxel->world is pixdim scaling only, "
                    + "orientation unknown (shown as RAS)");
            checkInvertible(p.voxelToWorld, p.source, "pixdim");
        }
    }

    private static Affine3D qform(ByteBuffer bb, Parsed p) throws NiftiFormatException {
        checkSpacing(p);
        String[] names = {"quatern_b", "quatern_c", "quatern_d", "qoffset_x", "qoffset_y", "qoffset_z"};
        double[] q = new double[6];
        for (int n = 0; n < 6; n++) {
            q[n] = bb.getFloat(256 + 4 * n);
            if (!Double.isFinite(q[n])) {
                throw new NiftiFormatException(p.source, names[n], fmt(q[n]),
                        "qform parameter must be finite, got " + fmt(q[n]));
            }
        }
        // nifti1_io.c: qfac = -1 if pixdim[0] < 0, else +1.
        double qfac = p.pixdim[0] < 0 ? -1.0 : 1.0;
        double u = p.unitMm;
        Affine3D a;
        try {
            a = NiftiQuaternion.toAffine(q[0], q[1], q[2], q[3] * u, q[4] * u, q[5] * u,
                    p.pixdim[1] * u, p.pixdim[2] * u, p.pixdim[3] * u, qfac);
        } catch (IllegalArgumentException e) {
            throw new NiftiFormatException(p.source, "qform", "", "qform cannot be evaluated: " + e.getMessage(), e);
        }
        checkInvertible(a, p.source, "qform");
        return a;
    }

    private static void checkSpacing(Parsed p) throws NiftiFormatException {
        for (int n = 1; n <= 3; n++) {
            double v = p.pixdim[n];
            if (!Double.isFinite(v) || !(v > 0)) {
                throw new NiftiFormatException(p.source, "pixdim[" + n + "]", fmt(v),
                        "spacing must be finite and > 0, got " + fmt(v));
            }
        }
    }

    private static void checkInvertible(Affine3D a, String source, String field) throws NiftiFormatException {
        double n0 = a.columnNorm(0);
        double n1 = a.columnNorm(1);
        double n2 = a.columnNorm(2);
        double det = a.determinant();
        double scale = n0 * n1 * n2;
        if (!Double.isFinite(scale) || !Double.isFinite(det)) {
            throw new NiftiFormatException(source, field, a.toString(),
                    "voxel->world entries are too large to use (column lengths " + fmt(n0) + ", " + fmt(n1)
                    + ", " + fmt(n2) + " mm)");
        }
        if (!(scale > 0) || !(Math.abs(det) > MIN_RELATIVE_DETERMINANT * scale)
                || !(Math.abs(det) > Affine3D.SINGULAR_DETERMINANT)) {
            throw new NiftiFormatException(source, field, a.toString(),
                    "voxel->world map is singular (det = " + fmt(det) + " mm^3, column lengths "
                    + fmt(n0) + ", " + fmt(n1) + ", " + fmt(n2) + " mm)");
        }
    }

    private static double maxCornerDistance(Affine3D a, Affine3D b, int[] dim) {
        double max = 0;
        for (int c = 0; c < 8; c++) {
            double i = (c & 1) == 0 ? 0 : dim[1] - 1;
            double j = (c & 2) == 0 ? 0 : dim[2] - 1;
            double k = (c & 4) == 0 ? 0 : dim[3] - 1;
            double[] pa = a.applyPoint(i, j, k);
            double[] pb = b.applyPoint(i, j, k);
            double dx = pa[0] - pb[0];
            double dy = pa[1] - pb[1];
            double dz = pa[2] - pb[2];
            max = Math.max(max, Math.sqrt(dx * dx + dy * dy + dz * dz));
        }
        return max;
    }

    private static String cString(byte[] b, int off, int len) {
        int end = off;
        while (end < off + len && b[end] != 0) {
            end++;
        }
        return new String(b, off, end - off, StandardCharsets.ISO_8859_1);
    }

    private static String printable(byte[] b, int off, int len) {
        StringBuilder sb = new StringBuilder();
        for (int n = off; n < off + len; n++) {
            int c = b[n] & 0xFF;
            if (c >= 32 && c < 127 && c != '"' && c != '\\') {
                sb.append((char) c);
            } else {
                sb.append(String.format(Locale.ROOT, "\\x%02x", c));
            }
        }
        return sb.toString();
    }

    static String fmt(double v) {
        return Double.isFinite(v) && v == Math.rint(v) && Math.abs(v) < 1e15
                ? Long.toString((long) v) : Double.toString(v);
    }

    @Override
    public String toString() {
        return source + ": " + datatype.label() + " " + Arrays.toString(Arrays.copyOfRange(dim, 1, dim[0] + 1))
                + " " + transformSource.label() + " " + voxelToWorld;
    }
}
