package org.turnmark.mechanics.mesh;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.turnmark.geom.Grid3;

/**
 * Reads the written files back with an independent parser written from the legacy format
 * specification ("VTK File Formats", VTK User's Guide, Kitware: keywords, counts, CELLS size = total
 * integers, cell type 12 = VTK_HEXAHEDRON, binary data big-endian).
 */
class VtkWriterTest {

    @TempDir
    Path dir;

    private static HexMesh mesh() {
        Grid3 g = Grid3.axisAligned(9, 7, 5, 1, 1, 1, 0, 0, 0);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBox(g, lab, 0, 9, 0, 7, 0, 5, 1);
        LabelVolumes.fillBox(g, lab, 0, 4, 0, 7, 0, 5, 2);
        return LabelMesher.mesh(g, lab, MesherConfig.of(2)).mesh();
    }

    /** Parsed content: arrays by section name. */
    private static final class Parsed {
        final Map<String, double[]> doubles = new HashMap<>();
        final Map<String, int[]> ints = new HashMap<>();
        String title;
        String encoding;
    }

    /** A minimal legacy reader: header lines as text, data as tokens or big-endian binary. */
    private static Parsed parse(byte[] file) {
        Parsed p = new Parsed();
        ByteBuffer b = ByteBuffer.wrap(file).order(ByteOrder.BIG_ENDIAN);
        assertEquals("# vtk DataFile Version 3.0", line(b));
        p.title = line(b);
        p.encoding = line(b);
        boolean bin = p.encoding.equals("BINARY");
        assertEquals("DATASET UNSTRUCTURED_GRID", line(b));
        String section = "";
        while (b.hasRemaining()) {
            String l = line(b);
            if (l.isEmpty()) {
                continue;
            }
            String[] t = l.split(" ");
            switch (t[0]) {
                case "POINTS" -> p.doubles.put("POINTS", doubles(b, 3 * Integer.parseInt(t[1]), bin));
                case "CELLS" -> {
                    int[] c = ints(b, Integer.parseInt(t[2]), bin);
                    assertEquals(9 * Integer.parseInt(t[1]), c.length);
                    p.ints.put("CELLS", c);
                }
                case "CELL_TYPES" -> p.ints.put("CELL_TYPES", ints(b, Integer.parseInt(t[1]), bin));
                case "POINT_DATA", "CELL_DATA" -> {
                    section = t[0] + ":";
                    p.ints.put(t[0], new int[] {Integer.parseInt(t[1])});
                }
                case "VECTORS" -> p.doubles.put(section + t[1],
                        doubles(b, 3 * p.ints.get(section.substring(0, section.length() - 1))[0], bin));
                case "SCALARS" -> {
                    assertEquals("LOOKUP_TABLE default", line(b));
                    int n = p.ints.get(section.substring(0, section.length() - 1))[0];
                    if (t[2].equals("int")) {
                        p.ints.put(section + t[1], ints(b, n, bin));
                    } else {
                        p.doubles.put(section + t[1], doubles(b, n, bin));
                    }
                }
                default -> throw new AssertionError("unexpected line '" + l + "'");
            }
        }
        return p;
    }

    private static String line(ByteBuffer b) {
        StringBuilder sb = new StringBuilder();
        while (b.hasRemaining()) {
            char c = (char) b.get();
            if (c == '\n') {
                break;
            }
            sb.append(c);
        }
        return sb.toString();
    }

    private static String token(ByteBuffer b) {
        StringBuilder sb = new StringBuilder();
        while (b.hasRemaining()) {
            char c = (char) b.get();
            if (c == ' ' || c == '\n') {
                if (sb.length() > 0) {
                    break;
                }
                continue;
            }
            sb.append(c);
        }
        return sb.toString();
    }

    private static double[] doubles(ByteBuffer b, int n, boolean bin) {
        double[] v = new double[n];
        for (int i = 0; i < n; i++) {
            v[i] = bin ? b.getDouble() : Double.parseDouble(token(b));
        }
        return v;
    }

    private static int[] ints(ByteBuffer b, int n, boolean bin) {
        int[] v = new int[n];
        for (int i = 0; i < n; i++) {
            v[i] = bin ? b.getInt() : Integer.parseInt(token(b));
        }
        return v;
    }

    @Test
    void bothEncodingsReadBackToTheSameMeshAndFields() throws IOException {
        HexMesh m = mesh();
        double[] u = new double[3 * m.nodeCount()];
        for (int i = 0; i < u.length; i++) {
            u[i] = Math.sin(i) * 1e-3 + i * 0.1;
        }
        double[] detF = new double[m.elementCount()];
        double[] vm = new double[m.elementCount()];
        for (int e = 0; e < detF.length; e++) {
            detF[e] = 1 + 0.01 * e;
            vm[e] = 0.123456789e-3 * e;
        }
        for (VtkWriter.Encoding enc : VtkWriter.Encoding.values()) {
            Path f = dir.resolve("mesh_" + enc + ".vtk");
            new VtkWriter(m).pointVectors("displacement_mm", u).cellScalars("det_F", detF)
                    .cellScalars("von_mises_kPa", vm).write(f, enc);
            Parsed p = parse(Files.readAllBytes(f));
            assertEquals(enc.name(), p.encoding);
            assertTrue(p.title.contains("RESEARCH USE ONLY"));
            assertArrayEquals(m.xyzMm(), p.doubles.get("POINTS"));
            int[] cells = p.ints.get("CELLS");
            for (int e = 0; e < m.elementCount(); e++) {
                assertEquals(8, cells[9 * e]);
                for (int a = 0; a < 8; a++) {
                    assertEquals(m.hex()[8 * e + a], cells[9 * e + 1 + a]);
                }
            }
            for (int t : p.ints.get("CELL_TYPES")) {
                assertEquals(12, t);
            }
            assertArrayEquals(u, p.doubles.get("POINT_DATA:displacement_mm"));
            assertArrayEquals(m.label(), p.ints.get("CELL_DATA:label"));
            assertArrayEquals(detF, p.doubles.get("CELL_DATA:det_F"));
            assertArrayEquals(vm, p.doubles.get("CELL_DATA:von_mises_kPa"));
            try (var s = Files.list(dir)) {
                assertTrue(s.noneMatch(x -> x.getFileName().toString().endsWith(".tmp")), "no temporary left");
            }
        }
        // Header is plain ASCII with the documented keywords.
        String head = new String(Files.readAllBytes(dir.resolve("mesh_ASCII.vtk")), StandardCharsets.US_ASCII);
        assertTrue(head.contains("POINTS " + m.nodeCount() + " double\n"));
        assertTrue(head.contains("CELLS " + m.elementCount() + " " + 9 * m.elementCount() + "\n"));
    }

    /** Weighted sums of ~10³ values of order 10²·index: double round-off relative ~1e-13. */
    private static final double SUM_RELATIVE = 1e-12;

    private static double wsum(double[] a) {
        double s = 0;
        for (int i = 0; i < a.length; i++) {
            s += a[i] * (i + 1.0);
        }
        return s;
    }

    @Test
    void debianMeshioReadsBothEncodings() throws Exception {
        // Outside reader: Debian python3-meshio (VTK legacy reader), script committed beside the tests.
        HexMesh m = mesh();
        double[] u = new double[3 * m.nodeCount()];
        for (int i = 0; i < u.length; i++) {
            u[i] = 0.25 * i - 3;
        }
        double[] detF = new double[m.elementCount()];
        for (int e = 0; e < detF.length; e++) {
            detF[e] = 0.9 + 0.001 * e;
        }
        double[] conn = new double[m.hex().length];
        for (int i = 0; i < conn.length; i++) {
            conn[i] = m.hex()[i];
        }
        double[] lab = new double[m.elementCount()];
        for (int e = 0; e < lab.length; e++) {
            lab[e] = m.label()[e];
        }
        Path script = Path.of("src/test/resources/vtk/read_with_meshio.py").toAbsolutePath();
        List<String> cmd = new ArrayList<>(List.of("/usr/bin/python3", script.toString()));
        for (VtkWriter.Encoding enc : VtkWriter.Encoding.values()) {
            Path f = dir.resolve("m_" + enc + ".vtk");
            new VtkWriter(m).pointVectors("displacement_mm", u).cellScalars("det_F", detF).write(f, enc);
            cmd.add(f.toString());
        }
        // One interpreter for both files: importing meshio takes seconds.
        Process pr = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        String out = new String(pr.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertEquals(0, pr.waitFor(), out);
        String[] perFile = out.split("(?m)^file ");
        assertEquals(3, perFile.length, out);
        for (int fi = 1; fi < perFile.length; fi++) {
            Map<String, String> got = new HashMap<>();
            for (String l : perFile[fi].split("\\n")) {
                int sp = l.lastIndexOf(' ');
                if (sp > 0) {
                    got.put(l.substring(0, sp), l.substring(sp + 1));
                }
            }
            assertEquals(Integer.toString(m.nodeCount()), got.get("points"), out);
            assertEquals(Integer.toString(m.elementCount()), got.get("cells hexahedron"), out);
            double[][] expect = {m.xyzMm(), conn, u, detF, lab};
            String[] keys = {"point", "conn", "pdata displacement_mm", "cdata det_F", "cdata label"};
            for (int k = 0; k < keys.length; k++) {
                double e = wsum(expect[k]);
                assertEquals(e, Double.parseDouble(got.get(keys[k])), SUM_RELATIVE * Math.abs(e), keys[k] + ": " + out);
            }
        }
    }

    @Test
    void wrongSizesNamesAndNonFiniteValuesAreRejected() {
        HexMesh m = mesh();
        VtkWriter w = new VtkWriter(m);
        assertThrows(IllegalArgumentException.class, () -> w.pointVectors("u", new double[5]));
        assertThrows(IllegalArgumentException.class, () -> w.cellScalars("det F", new double[m.elementCount()]));
        assertThrows(IllegalArgumentException.class, () -> w.cellScalars("label", new double[m.elementCount()]));
        double[] bad = new double[m.elementCount()];
        bad[1] = Double.NaN;
        assertThrows(IllegalArgumentException.class, () -> w.cellScalars("det_F", bad));
    }
}
