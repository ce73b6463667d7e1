package org.turnmark.mechanics.mesh;

import java.io.BufferedOutputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Pattern;

/**
 * Writes a hexahedral mesh and its fields as a VTK legacy unstructured grid (file format version 3.0,
 * "VTK File Formats", VTK User's Guide, Kitware): {@code POINTS} (double, world RAS mm), {@code CELLS}
 * with 8 node indices each, {@code CELL_TYPES} 12 (VTK_HEXAHEDRON), then {@code POINT_DATA} and
 * {@code CELL_DATA} sections. The element label is always written as the integer cell scalar
 * {@code label}. Binary files are big-endian as the legacy format requires, with a newline after each
 * binary block. The title line carries the research-use caution.
 *
 * <p>Usage: {@code new VtkWriter(mesh).pointVectors("displacement_mm", u).cellScalars("det_F", j)
 * .write(path, Encoding.BINARY)}. Arrays are read at {@link #write} time, not copied. The file is
 * written to a temporary file in the target directory and moved into place, so a failure leaves no
 * partial file under the final name. Not thread safe.
 */
public final class VtkWriter {

    /** Legacy file encodings. */
    public enum Encoding {
        /** Human-readable text. */
        ASCII,
        /** Big-endian binary. */
        BINARY
    }

    /** Title written on line 2 (legacy format limit: one line, ≤ 256 characters). */
    public static final String TITLE = "Turnmark hexahedral mesh, world RAS mm - RESEARCH USE ONLY, not for diagnosis";

    private static final Pattern NAME = Pattern.compile("[A-Za-z][A-Za-z0-9_]{0,62}");

    private final HexMesh mesh;
    private final List<Field> pointFields = new ArrayList<>();
    private final List<Field> cellFields = new ArrayList<>();

    private record Field(String name, double[] values, int components) {
    }

    /** A writer for {@code mesh}. */
    public VtkWriter(HexMesh mesh) {
        this.mesh = mesh;
    }

    /** Adds a 3-vector per node (for example displacement in mm). Returns this. */
    public VtkWriter pointVectors(String name, double[] values) {
        pointFields.add(checked(name, values, 3, mesh.nodeCount(), "node"));
        return this;
    }

    /** Adds a scalar per node. Returns this. */
    public VtkWriter pointScalars(String name, double[] values) {
        pointFields.add(checked(name, values, 1, mesh.nodeCount(), "node"));
        return this;
    }

    /** Adds a scalar per element (for example det F or von Mises stress in kPa). Returns this. */
    public VtkWriter cellScalars(String name, double[] values) {
        cellFields.add(checked(name, values, 1, mesh.elementCount(), "element"));
        return this;
    }

    private Field checked(String name, double[] values, int comps, int count, String what) {
        if (!NAME.matcher(name).matches() || name.equals("label")) {
            throw new IllegalArgumentException("VTK field name must be a letter then letters, digits or '_' "
                    + "(not 'label', which is reserved), got '" + name + "'");
        }
        if (values.length != comps * count) {
            throw new IllegalArgumentException("field " + name + " needs " + comps + " value(s) per " + what + " ("
                    + comps * count + "), got " + values.length);
        }
        for (int i = 0; i < values.length; i++) {
            if (!Double.isFinite(values[i])) {
                throw new IllegalArgumentException("field " + name + " has a non-finite value " + values[i]
                        + " at " + what + " " + i / comps);
            }
        }
        return new Field(name, values, comps);
    }

    /**
     * Writes the file atomically (temporary file in the same directory, then an atomic move that
     * replaces any existing file).
     */
    public void write(Path path, Encoding encoding) throws IOException {
        Path abs = path.toAbsolutePath();
        Path dir = abs.getParent();
        Path tmp = Files.createTempFile(dir, "." + abs.getFileName(), ".tmp");
        try {
            try (OutputStream os = new BufferedOutputStream(Files.newOutputStream(tmp), 1 << 16)) {
                writeTo(os, encoding);
            }
            Files.move(tmp, abs, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
        } finally {
            Files.deleteIfExists(tmp);
        }
    }

    /** Writes the file contents to {@code os} (not closed). */
    public void writeTo(OutputStream os, Encoding encoding) throws IOException {
        DataOutputStream out = new DataOutputStream(os);
        boolean bin = encoding == Encoding.BINARY;
        int nn = mesh.nodeCount();
        int ne = mesh.elementCount();
        text(out, "# vtk DataFile Version 3.0\n" + TITLE + "\n" + (bin ? "BINARY" : "ASCII")
                + "\nDATASET UNSTRUCTURED_GRID\nPOINTS " + nn + " double\n");
        writeDoubles(out, mesh.xyzMm(), 3, bin);
        text(out, "CELLS " + ne + " " + 9 * ne + "\n");
        int[] hex = mesh.hex();
        if (bin) {
            for (int e = 0; e < ne; e++) {
                out.writeInt(8);
                for (int a = 0; a < 8; a++) {
                    out.writeInt(hex[8 * e + a]);
                }
            }
            text(out, "\n");
        } else {
            StringBuilder sb = new StringBuilder(64);
            for (int e = 0; e < ne; e++) {
                sb.setLength(0);
                sb.append('8');
                for (int a = 0; a < 8; a++) {
                    sb.append(' ').append(hex[8 * e + a]);
                }
                text(out, sb.append('\n').toString());
            }
        }
        text(out, "CELL_TYPES " + ne + "\n");
        int[] types = new int[ne];
        java.util.Arrays.fill(types, 12);
        writeInts(out, types, bin);
        if (!pointFields.isEmpty()) {
            text(out, "POINT_DATA " + nn + "\n");
            for (Field f : pointFields) {
                writeField(out, f, bin);
            }
        }
        text(out, "CELL_DATA " + ne + "\nSCALARS label int 1\nLOOKUP_TABLE default\n");
        writeInts(out, mesh.label(), bin);
        for (Field f : cellFields) {
            writeField(out, f, bin);
        }
        out.flush();
    }

    private static void writeField(DataOutputStream out, Field f, boolean bin) throws IOException {
        if (f.components() == 3) {
            text(out, "VECTORS " + f.name() + " double\n");
        } else {
            text(out, "SCALARS " + f.name() + " double 1\nLOOKUP_TABLE default\n");
        }
        writeDoubles(out, f.values(), f.components(), bin);
    }

    private static void writeDoubles(DataOutputStream out, double[] v, int perLine, boolean bin) throws IOException {
        if (bin) {
            for (double d : v) {
                out.writeDouble(d);
            }
            text(out, "\n");
            return;
        }
        StringBuilder sb = new StringBuilder(96);
        for (int i = 0; i < v.length; i += perLine) {
            sb.setLength(0);
            for (int c = 0; c < perLine; c++) {
                // Shortest representation that reads back to the same double.
                sb.append(c == 0 ? "" : " ").append(Double.toString(v[i + c]));
            }
            text(out, sb.append('\n').toString());
        }
    }

    private static void writeInts(DataOutputStream out, int[] v, boolean bin) throws IOException {
        if (bin) {
            for (int x : v) {
                out.writeInt(x);
            }
            text(out, "\n");
            return;
        }
        for (int x : v) {
            text(out, Integer.toString(x) + "\n");
        }
    }

    private static void text(DataOutputStream out, String s) throws IOException {
        out.write(s.getBytes(StandardCharsets.US_ASCII));
    }
}
