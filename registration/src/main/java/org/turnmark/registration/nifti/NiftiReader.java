package org.turnmark.registration.nifti;

import java.io.BufferedInputStream;
import java.io.ByteArrayInputStream;
import java.io.EOFException;
import java.io.IOException;
import java.io.InputStream;
import java.nio.ByteBuffer;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.Locale;
import java.util.zip.GZIPInputStream;
import java.util.zip.ZipException;

import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Reads NIfTI-1 images ({@code nifti1.h}): {@code .nii}, {@code .nii.gz}, and {@code .hdr}/{@code .img}
 * pairs (either part may be gzipped; compression is detected from the content, not the name).
 *
 * <p>Supported: both byte orders, datatypes uint8, int8, int16, uint16, int32, uint32, float32 and
 * float64 (converted to float32 after {@code scl_slope}/{@code scl_inter} scaling; int32/uint32
 * above 2^24 and float64 lose precision), 3-D scalar images, one chosen frame of a 4-D series, and
 * 3-component vector fields stored as {@code dim[5]} = 3 planes. Data start at {@code vox_offset},
 * so header extensions are skipped. Geometry rules are in {@link NiftiHeader}.
 *
 * <p>Failure: every problem with the file raises a {@link NiftiFormatException} naming the file
 * and field; no partially filled volume is ever returned. Before any voxel array is allocated, the
 * memory it needs (4 bytes per returned float value) is checked against the reader's limit
 * ({@link #maxVoxelBytes()}); besides the returned arrays the reader allocates one transfer
 * buffer of at most {@link #CHUNK_BYTES}. gzip streams are read to their end so that a truncated or
 * corrupt stream (CRC) is detected even when only one frame is needed.
 *
 * <p>Instances are immutable and thread safe.
 */
public final class NiftiReader {

    /** Fraction of the JVM's maximum heap ({@code -Xmx}) that the default limit allows for voxel data. */
    public static final double DEFAULT_HEAP_FRACTION = 0.75;

    /** Size of the single transfer buffer used while decoding (bytes). */
    public static final int CHUNK_BYTES = 1 << 20;

    /** Largest Java array, in elements (a common JVM limit). */
    private static final long MAX_ARRAY = Integer.MAX_VALUE - 8L;

    private final long maxVoxelBytes;

    /** A reader whose limit is {@link #defaultMaxVoxelBytes()}. */
    public NiftiReader() {
        this(defaultMaxVoxelBytes());
    }

    /**
     * @param maxVoxelBytes the most memory (bytes) the returned voxel arrays may take; larger images
     *                      are refused before allocation. Must be &gt; 0.
     */
    public NiftiReader(long maxVoxelBytes) {
        if (maxVoxelBytes <= 0) {
            throw new IllegalArgumentException("maxVoxelBytes must be > 0, got " + maxVoxelBytes);
        }
        this.maxVoxelBytes = maxVoxelBytes;
    }

    /** {@link #DEFAULT_HEAP_FRACTION} of {@code Runtime.maxMemory()}. */
    public static long defaultMaxVoxelBytes() {
        return (long) (Runtime.getRuntime().maxMemory() * DEFAULT_HEAP_FRACTION);
    }

    /** The limit on returned voxel arrays, in bytes. */
    public long maxVoxelBytes() {
        return maxVoxelBytes;
    }

    // ------------------------------------------------------------------------------------------
    // Files

    /** Reads and validates the header only. */
    public NiftiHeader readHeader(Path path) throws IOException {
        FileInput in = FileInput.of(path);
        return in.header();
    }

    /**
     * Reads a scalar image with a single frame (3-D, or 4-D with {@code dim[4]} = 1).
     *
     * @throws NiftiFormatException also when the image has several frames (use
     *                              {@link #readVolume(Path, int)}) or vector components
     */
    public NiftiVolume readVolume(Path path) throws IOException {
        FileInput in = FileInput.of(path);
        NiftiHeader h = in.header();
        if (h.frames() != 1) {
            throw new NiftiFormatException(h.source(), "dim[4]", Integer.toString(h.frames()),
                    "image has " + h.frames() + " frames; choose one (frames are numbered from 0)");
        }
        return volume(in, h, 0);
    }

    /** Reads frame {@code frame} (0-based along {@code dim[4]}) of a scalar image. */
    public NiftiVolume readVolume(Path path, int frame) throws IOException {
        FileInput in = FileInput.of(path);
        return volume(in, in.header(), frame);
    }

    /** Reads a 3-component vector field ({@code dim[5]} = 3, {@code dim[4]} = 1). */
    public NiftiVectorField readVectorField(Path path) throws IOException {
        FileInput in = FileInput.of(path);
        return vectorField(in, in.header());
    }

    // ------------------------------------------------------------------------------------------
    // In memory (single-file images only; used by tests and the fuzzer)

    /** Parses the header of a single-file image held in memory ({@code .nii} or gzipped {@code .nii}). */
    public NiftiHeader readHeader(byte[] file, String name) throws NiftiFormatException {
        return wrapIo(name, () -> new MemoryInput(file, name).header());
    }

    /** As {@link #readVolume(Path, int)} for a single-file image held in memory. */
    public NiftiVolume readVolume(byte[] file, String name, int frame) throws NiftiFormatException {
        return wrapIo(name, () -> {
            MemoryInput in = new MemoryInput(file, name);
            return volume(in, in.header(), frame);
        });
    }

    /** As {@link #readVectorField(Path)} for a single-file image held in memory. */
    public NiftiVectorField readVectorField(byte[] file, String name) throws NiftiFormatException {
        return wrapIo(name, () -> {
            MemoryInput in = new MemoryInput(file, name);
            return vectorField(in, in.header());
        });
    }

    private interface IoCall<T> {
        T call() throws IOException;
    }

    private static <T> T wrapIo(String name, IoCall<T> c) throws NiftiFormatException {
        try {
            return c.call();
        } catch (NiftiFormatException e) {
            throw e;
        } catch (IOException e) {
            // Memory streams raise no I/O errors of their own: anything else is a format problem.
            throw new NiftiFormatException(name, "data", "", "cannot be read: " + e.getMessage(), e);
        }
    }

    // ------------------------------------------------------------------------------------------
    // Decoding

    private NiftiVolume volume(Input in, NiftiHeader h, int frame) throws IOException {
        if (h.components() != 1) {
            throw new NiftiFormatException(h.source(), "dim[5]", Integer.toString(h.components()),
                    "image has " + h.components() + " values per voxel (dim[5]); expected a scalar image"
                    + (h.isVectorField() ? " (this is a vector field)" : ""));
        }
        checkNoHigherDims(h);
        if (frame < 0 || frame >= h.frames()) {
            throw new NiftiFormatException(h.source(), "dim[4]", Integer.toString(h.frames()),
                    "frame " + frame + " requested, but the image has frames 0.." + (h.frames() - 1));
        }
        Grid3 grid = grid(h, 1);
        float[][] planes = readPlanes(in, h, (long) frame, 1);
        long bad = countNonFinite(planes[0]);
        return new NiftiVolume(h, new Volume(grid, planes[0]), frame, bad);
    }

    private NiftiVectorField vectorField(Input in, NiftiHeader h) throws IOException {
        if (h.components() != 3 || h.frames() != 1) {
            throw new NiftiFormatException(h.source(), "dim[4..5]", h.frames() + "," + h.components(),
                    "a vector field needs dim[4] = 1 and dim[5] = 3, got dim[4] = " + h.frames()
                    + ", dim[5] = " + h.components());
        }
        checkNoHigherDims(h);
        Grid3 grid = grid(h, 3);
        float[][] planes = readPlanes(in, h, 0, 3);
        if (h.intentCode() == NiftiHeader.INTENT_DISPVECT && h.spatialUnitMm() != 1.0) {
            float u = (float) h.spatialUnitMm();
            for (float[] p : planes) {
                for (int n = 0; n < p.length; n++) {
                    p[n] *= u;
                }
            }
        }
        long bad = countNonFinite(planes[0]) + countNonFinite(planes[1]) + countNonFinite(planes[2]);
        return new NiftiVectorField(h, new VectorField(grid, planes[0], planes[1], planes[2]), bad);
    }

    private static void checkNoHigherDims(NiftiHeader h) throws NiftiFormatException {
        int[] d = h.dim();
        for (int n = 6; n <= 7; n++) {
            if (d[n] != 1) {
                throw new NiftiFormatException(h.source(), "dim[" + n + "]", Integer.toString(d[n]),
                        "dimensions beyond the 5th are not supported, got dim[" + n + "] = " + d[n]);
            }
        }
    }

    /** Checks the memory limit, then builds the grid (no voxel memory allocated yet). */
    private Grid3 grid(NiftiHeader h, int planes) throws NiftiFormatException {
        long n = h.voxelsPerFrame();
        if (n > MAX_ARRAY) {
            throw new NiftiFormatException(h.source(), "dim[1..3]", h.nx() + "x" + h.ny() + "x" + h.nz(),
                    "one frame has " + n + " voxels, more than a Java array holds (" + MAX_ARRAY + ")");
        }
        long need = 4L * n * planes;
        if (need > maxVoxelBytes) {
            throw new NiftiFormatException(h.source(), "dim[1..5]", h.nx() + "x" + h.ny() + "x" + h.nz()
                    + (planes > 1 ? "x" + planes : ""),
                    "image needs " + bytes(need) + " of memory for its voxels, more than the limit of "
                    + bytes(maxVoxelBytes) + " (" + Math.round(100 * DEFAULT_HEAP_FRACTION)
                    + " % of the Java heap by default; raise it with -Xmx, e.g. TURNMARK_JAVA_OPTS=-Xmx16g)");
        }
        return h.grid();
    }

    /**
     * Reads {@code planes} consecutive 3-D planes starting at plane {@code firstPlane} of the data,
     * then checks that the rest of the data is present.
     */
    private float[][] readPlanes(Input in, NiftiHeader h, long firstPlane, int planes) throws IOException {
        NiftiDatatype t = h.datatype();
        int bpv = t.bytesPerVoxel();
        int n = (int) h.voxelsPerFrame();
        long planeBytes = (long) n * bpv;
        long totalBytes = totalDataBytes(h);
        long skip = firstPlane * planeBytes;
        DataPart d = in.openData(h);
        try (InputStream s = d.stream) {
            if (d.rawSize >= 0 && d.rawSize < h.voxOffset() + totalBytes) {
                throw new NiftiFormatException(d.name, "data", Long.toString(d.rawSize),
                        "file is truncated: header needs " + (h.voxOffset() + totalBytes) + " bytes ("
                        + h.voxOffset() + " offset + " + totalBytes + " data), the file has " + d.rawSize);
            }
            skipFully(s, h.voxOffset() + skip, d);
            float[][] out = new float[planes][n];
            int chunkVoxels = (int) Math.max(1, Math.min(n, CHUNK_BYTES / bpv));
            byte[] buf = new byte[chunkVoxels * bpv];
            ByteBuffer bb = ByteBuffer.wrap(buf).order(h.byteOrder());
            for (int p = 0; p < planes; p++) {
                for (int start = 0; start < n; start += chunkVoxels) {
                    int count = Math.min(chunkVoxels, n - start);
                    readFully(s, buf, count * bpv, d);
                    decode(bb, t, count, h.isScaled(), h.slope(), h.intercept(), out[p], start);
                }
            }
            long rest = totalBytes - skip - planes * planeBytes;
            if (d.compressed) {
                drain(s, rest, d);
            }
            return out;
        } catch (ZipException e) {
            throw new NiftiFormatException(d.name, "gzip stream", "", "corrupt gzip data: " + e.getMessage(), e);
        } catch (EOFException e) {
            throw truncated(d, e);
        }
    }

    private static long totalDataBytes(NiftiHeader h) throws NiftiFormatException {
        int[] dim = h.dim();
        long total = h.datatype().bytesPerVoxel();
        try {
            for (int n = 1; n <= 7; n++) {
                total = Math.multiplyExact(total, (long) dim[n]);
            }
        } catch (ArithmeticException e) {
            throw new NiftiFormatException(h.source(), "dim", java.util.Arrays.toString(dim),
                    "image size overflows 64 bits", e);
        }
        return total;
    }

    /**
     * Decodes {@code count} stored values from {@code bb} (position 0) into {@code out[at..]}.
     * Kept as one switch per chunk so the inner loops stay monomorphic.
     */
    private static void decode(ByteBuffer bb, NiftiDatatype t, int count, boolean scaled, double slope,
                               double inter, float[] out, int at) {
        switch (t) {
            case UINT8:
                for (int n = 0; n < count; n++) {
                    int v = bb.get(n) & 0xFF;
                    out[at + n] = scaled ? (float) (slope * v + inter) : v;
                }
                break;
            case INT8:
                for (int n = 0; n < count; n++) {
                    int v = bb.get(n);
                    out[at + n] = scaled ? (float) (slope * v + inter) : v;
                }
                break;
            case INT16:
                for (int n = 0; n < count; n++) {
                    int v = bb.getShort(2 * n);
                    out[at + n] = scaled ? (float) (slope * v + inter) : v;
                }
                break;
            case UINT16:
                for (int n = 0; n < count; n++) {
                    int v = bb.getShort(2 * n) & 0xFFFF;
                    out[at + n] = scaled ? (float) (slope * v + inter) : v;
                }
                break;
            case INT32:
                for (int n = 0; n < count; n++) {
                    int v = bb.getInt(4 * n);
                    out[at + n] = scaled ? (float) (slope * v + inter) : (float) v;
                }
                break;
            case UINT32:
                for (int n = 0; n < count; n++) {
                    long v = bb.getInt(4 * n) & 0xFFFFFFFFL;
                    out[at + n] = scaled ? (float) (slope * v + inter) : (float) v;
                }
                break;
            case FLOAT32:
                for (int n = 0; n < count; n++) {
                    float v = bb.getFloat(4 * n);
                    out[at + n] = scaled ? (float) (slope * v + inter) : v;
                }
                break;
            case FLOAT64:
                for (int n = 0; n < count; n++) {
                    double v = bb.getDouble(8 * n);
                    out[at + n] = (float) (scaled ? slope * v + inter : v);
                }
                break;
            default:
                throw new IllegalStateException("unreadable datatype passed header validation: " + t);
        }
    }

    private static long countNonFinite(float[] a) {
        long c = 0;
        for (float v : a) {
            if (!Float.isFinite(v)) {
                c++;
            }
        }
        return c;
    }

    private static void readFully(InputStream s, byte[] buf, int len, DataPart d) throws IOException {
        int off = 0;
        while (off < len) {
            int r = s.read(buf, off, len - off);
            if (r < 0) {
                throw truncated(d, null);
            }
            off += r;
        }
    }

    private static void skipFully(InputStream s, long count, DataPart d) throws IOException {
        long left = count;
        while (left > 0) {
            long k = s.skip(left);
            if (k <= 0) {
                // skip() may return 0 before the end; read one byte to tell end from a pause.
                if (s.read() < 0) {
                    throw truncated(d, null);
                }
                k = 1;
            }
            left -= k;
        }
    }

    /** Reads to the end of a compressed stream: at least {@code expected} more bytes must follow. */
    private static void drain(InputStream s, long expected, DataPart d) throws IOException {
        byte[] buf = new byte[8192];
        long got = 0;
        int r;
        while ((r = s.read(buf)) >= 0) {
            got += r;
        }
        if (got < expected) {
            throw truncated(d, null);
        }
    }

    private static NiftiFormatException truncated(DataPart d, Throwable cause) {
        String what = d.compressed
                ? "gzip stream ends before the image data do (file truncated or corrupt)"
                : "file is truncated: it ends before the image data do";
        return new NiftiFormatException(d.name, d.compressed ? "gzip stream" : "data", "", what, cause);
    }

    private static String bytes(long b) {
        if (b >= 1L << 30) {
            return String.format(Locale.ROOT, "%.1f GiB", b / (double) (1L << 30));
        }
        if (b >= 1L << 20) {
            return String.format(Locale.ROOT, "%.1f MiB", b / (double) (1L << 20));
        }
        return b + " bytes";
    }

    // ------------------------------------------------------------------------------------------
    // Inputs

    /** An opened data stream, decompressed if it was gzipped. */
    private static final class DataPart {
        final String name;
        final InputStream stream;
        final boolean compressed;
        /** Size of the uncompressed file in bytes, or -1 when compressed (unknown until read). */
        final long rawSize;

        DataPart(String name, InputStream stream, boolean compressed, long rawSize) {
            this.name = name;
            this.stream = stream;
            this.compressed = compressed;
            this.rawSize = rawSize;
        }
    }

    private abstract static class Input {
        abstract NiftiHeader header() throws IOException;

        abstract DataPart openData(NiftiHeader h) throws IOException;

        /** Wraps {@code raw} in a gzip decoder if it starts with the gzip magic bytes 1f 8b. */
        static DataPart open(InputStream raw, String name, long size) throws IOException {
            BufferedInputStream b = new BufferedInputStream(raw, 1 << 16);
            try {
                b.mark(2);
                int b0 = b.read();
                int b1 = b.read();
                b.reset();
                if (b0 == 0x1f && b1 == 0x8b) {
                    return new DataPart(name, new GZIPInputStream(b, 1 << 16), true, -1);
                }
                return new DataPart(name, b, false, size);
            } catch (ZipException e) {
                b.close();
                throw new NiftiFormatException(name, "gzip stream", "", "corrupt gzip header: " + e.getMessage(), e);
            } catch (EOFException e) {
                b.close();
                throw new NiftiFormatException(name, "gzip stream", "", "gzip stream ends inside its header", e);
            } catch (IOException | RuntimeException e) {
                b.close();
                throw e;
            }
        }

        static NiftiHeader parseHeader(DataPart d) throws IOException {
            try (InputStream s = d.stream) {
                byte[] hdr = new byte[NiftiHeader.HEADER_SIZE];
                int off = 0;
                while (off < hdr.length) {
                    int r = s.read(hdr, off, hdr.length - off);
                    if (r < 0) {
                        break;
                    }
                    off += r;
                }
                if (off < hdr.length) {
                    if (d.compressed) {
                        throw new NiftiFormatException(d.name, "header", Integer.toString(off),
                                "gzip stream ends after " + off + " bytes, inside the 348-byte NIfTI-1 header");
                    }
                    throw new NiftiFormatException(d.name, "header", Integer.toString(off),
                            "file is truncated: a NIfTI-1 header needs 348 bytes, the file has " + off);
                }
                return NiftiHeader.parse(hdr, d.name);
            } catch (ZipException e) {
                throw new NiftiFormatException(d.name, "gzip stream", "", "corrupt gzip data: " + e.getMessage(), e);
            } catch (EOFException e) {
                throw new NiftiFormatException(d.name, "gzip stream", "",
                        "gzip stream ends inside the NIfTI-1 header (file truncated or corrupt)", e);
            }
        }
    }

    private static final class MemoryInput extends Input {
        private final byte[] file;
        private final String name;

        MemoryInput(byte[] file, String name) {
            this.file = file;
            this.name = name;
        }

        @Override
        NiftiHeader header() throws IOException {
            return parseHeader(open(new ByteArrayInputStream(file), name, file.length));
        }

        @Override
        DataPart openData(NiftiHeader h) throws IOException {
            if (!h.isSingleFile()) {
                throw new NiftiFormatException(name, "magic", "ni1",
                        "header of a .hdr/.img pair; its data are in a separate .img file");
            }
            return open(new ByteArrayInputStream(file), name, file.length);
        }
    }

    private static final class FileInput extends Input {
        private final Path headerPath;
        private final Path givenDataPath;

        private FileInput(Path headerPath, Path givenDataPath) {
            this.headerPath = headerPath;
            this.givenDataPath = givenDataPath;
        }

        /** Resolves the header file: for a given {@code .img[.gz]} the {@code .hdr[.gz]} beside it. */
        static FileInput of(Path path) throws NiftiFormatException {
            String name = path.getFileName() == null ? path.toString() : path.getFileName().toString();
            String lower = name.toLowerCase(Locale.ROOT);
            if (lower.endsWith(".img") || lower.endsWith(".img.gz")) {
                String base = name.substring(0, name.length() - (lower.endsWith(".gz") ? 7 : 4));
                Path hdr = firstExisting(path.resolveSibling(base + ".hdr"), path.resolveSibling(base + ".hdr.gz"));
                if (hdr == null) {
                    throw new NiftiFormatException(path.toString(), "header file", base + ".hdr",
                            "no header " + base + ".hdr (or .hdr.gz) beside the image data file");
                }
                return new FileInput(hdr, path);
            }
            return new FileInput(path, null);
        }

        private static Path firstExisting(Path... candidates) {
            for (Path p : candidates) {
                if (Files.isRegularFile(p)) {
                    return p;
                }
            }
            return null;
        }

        private static DataPart openFile(Path p) throws IOException {
            if (Files.isDirectory(p)) {
                throw new NiftiFormatException(p.toString(), "file", "", "is a directory, not a NIfTI-1 file");
            }
            try {
                long size = Files.size(p);
                return open(Files.newInputStream(p), p.toString(), size);
            } catch (NoSuchFileException e) {
                throw new NiftiFormatException(p.toString(), "file", "", "not found", e);
            }
        }

        @Override
        NiftiHeader header() throws IOException {
            return parseHeader(openFile(headerPath));
        }

        @Override
        DataPart openData(NiftiHeader h) throws IOException {
            if (h.isSingleFile()) {
                return openFile(headerPath);
            }
            if (givenDataPath != null) {
                return openFile(givenDataPath);
            }
            String name = headerPath.getFileName().toString();
            String lower = name.toLowerCase(Locale.ROOT);
            String base = name;
            for (String ext : new String[] {".hdr.gz", ".nii.gz", ".hdr", ".nii"}) {
                if (lower.endsWith(ext)) {
                    base = name.substring(0, name.length() - ext.length());
                    break;
                }
            }
            Path img = firstExisting(headerPath.resolveSibling(base + ".img"), headerPath.resolveSibling(base + ".img.gz"));
            if (img == null) {
                throw new NiftiFormatException(headerPath.toString(), "image file", base + ".img",
                        "header says the data are in a separate file (magic \"ni1\"), but " + base
                        + ".img (or .img.gz) was not found beside it");
            }
            return openFile(img);
        }
    }
}
