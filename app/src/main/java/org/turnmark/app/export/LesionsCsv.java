package org.turnmark.app.export;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.OutputStreamWriter;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.turnmark.app.pipeline.Descriptors;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.geom.ResearchUse;

/**
 * {@code lesions.csv}: one row per lesion and method (plus the prone mark itself), RFC 4180 quoting,
 * UTF-8. The first line is {@code # } followed by the caution; the second is the header. Every numeric
 * column name carries its unit. Coordinates ({@code x_ras_mm}, {@code y_ras_mm}, {@code z_ras_mm}) are
 * world RAS+ mm of the image named in {@code frame}, with 3 decimals (1 µm, far below any image
 * resolution); the standard deviations ({@code sd_x_ras_mm}, …) are along the same axes; semi-axes are those of
 * the 95 % ellipsoid; empty cells mean "not computed" (for example no uncertainty without samples, or
 * no depth from the chest wall when the model has no chest-wall surface).
 */
public final class LesionsCsv {

    /** Column names, in order. */
    public static final List<String> COLUMNS = List.of("case_id", "lesion_id", "side", "method", "frame",
            "x_ras_mm", "y_ras_mm", "z_ras_mm", "displacement_mm", "sd_x_ras_mm", "sd_y_ras_mm", "sd_z_ras_mm",
            "semi_axis_1_mm_95", "semi_axis_2_mm_95", "semi_axis_3_mm_95",
            "clock", "quadrant", "distance_from_nipple_cm", "depth_third", "depth_from_skin_mm",
            "depth_from_chest_wall_mm", "error_vs_truth_mm");

    /** A row as text cells keyed by column name. */
    public record Row(Map<String, String> cells) {
        /** The cell of {@code column}, empty string if blank. */
        public String get(String column) {
            String v = cells.get(column);
            return v == null ? "" : v;
        }

        /** The cell parsed as a number; throws if blank. */
        public double number(String column) {
            String v = get(column);
            if (v.isEmpty()) {
                throw new IllegalArgumentException("column " + column + " is blank");
            }
            return Double.parseDouble(v);
        }
    }

    private LesionsCsv() {
    }

    /** The rows for a plan, in output order. */
    public static List<Row> rows(PlanResult plan) {
        List<Row> out = new ArrayList<>();
        String caseId = plan.input() == null ? "" : plan.input().caseId();
        for (PlanResult.LesionResult l : plan.lesions()) {
            Map<String, String> m = base(caseId, l.id(), l.side(), PlanResult.MARKED, "prone image", l.proneRasMm());
            m.put("displacement_mm", mm(0));
            descriptors(m, l.proneDescriptors());
            out.add(new Row(m));
            for (PlanResult.Prediction p : l.predictions()) {
                Map<String, String> r = base(caseId, l.id(), l.side(), p.method(), p.frame(), p.positionRasMm());
                double[] d = p.displacementMm();
                r.put("displacement_mm", mm(Math.sqrt(d[0] * d[0] + d[1] * d[1] + d[2] * d[2])));
                if (p.covarianceMm2() != null) {
                    r.put("sd_x_ras_mm", mm(Math.sqrt(p.covarianceMm2()[0])));
                    r.put("sd_y_ras_mm", mm(Math.sqrt(p.covarianceMm2()[4])));
                    r.put("sd_z_ras_mm", mm(Math.sqrt(p.covarianceMm2()[8])));
                }
                if (p.ellipsoid95() != null) {
                    for (int i = 0; i < 3; i++) {
                        r.put("semi_axis_" + (i + 1) + "_mm_95", mm(p.ellipsoid95().semiAxesMm()[i]));
                    }
                }
                descriptors(r, p.descriptors());
                if (p.errorVsTruthMm() != null) {
                    r.put("error_vs_truth_mm", mm(p.errorVsTruthMm()));
                }
                out.add(new Row(r));
            }
        }
        return out;
    }

    private static Map<String, String> base(String caseId, String id, String side, String method, String frame,
                                            double[] xyz) {
        Map<String, String> m = new LinkedHashMap<>();
        m.put("case_id", caseId);
        m.put("lesion_id", id);
        m.put("side", side);
        m.put("method", method);
        m.put("frame", frame);
        m.put("x_ras_mm", mm(xyz[0]));
        m.put("y_ras_mm", mm(xyz[1]));
        m.put("z_ras_mm", mm(xyz[2]));
        return m;
    }

    private static void descriptors(Map<String, String> m, Descriptors.Descriptor d) {
        if (d == null) {
            return;
        }
        m.put("clock", d.clock());
        m.put("quadrant", d.quadrant());
        m.put("distance_from_nipple_cm", String.format(Locale.ROOT, "%.2f", d.distanceFromNippleCm()));
        m.put("depth_third", d.depthThird());
        m.put("depth_from_skin_mm", mm(d.depthFromSkinMm()));
        if (d.depthFromChestWallMm() != null) {
            m.put("depth_from_chest_wall_mm", mm(d.depthFromChestWallMm()));
        }
    }

    private static String mm(double v) {
        return String.format(Locale.ROOT, "%.3f", v);
    }

    /** Writes the CSV atomically. */
    public static void write(PlanResult plan, Path path) throws IOException {
        List<Row> rows = rows(plan);
        AtomicFiles.write(path, out -> {
            Writer w = new OutputStreamWriter(out, StandardCharsets.UTF_8);
            w.write("# " + ResearchUse.SHORT + "\n");
            w.write(String.join(",", COLUMNS) + "\n");
            for (Row r : rows) {
                StringBuilder sb = new StringBuilder();
                for (int c = 0; c < COLUMNS.size(); c++) {
                    if (c > 0) {
                        sb.append(',');
                    }
                    sb.append(quote(r.get(COLUMNS.get(c))));
                }
                w.write(sb.append('\n').toString());
            }
            w.flush();
        });
    }

    static String quote(String s) {
        if (s.indexOf(',') < 0 && s.indexOf('"') < 0 && s.indexOf('\n') < 0 && s.indexOf('\r') < 0) {
            return s;
        }
        return '"' + s.replace("\"", "\"\"") + '"';
    }

    /**
     * Reads a file written by {@link #write}: skips {@code #} comment lines, checks the header.
     *
     * @throws IOException for a header that is not {@link #COLUMNS} or a row with the wrong cell count
     */
    public static List<Row> read(Path path) throws IOException {
        List<Row> out = new ArrayList<>();
        try (BufferedReader r = Files.newBufferedReader(path, StandardCharsets.UTF_8)) {
            String line;
            List<String> header = null;
            int lineNo = 0;
            while ((line = r.readLine()) != null) {
                lineNo++;
                if (line.startsWith("#") || line.isEmpty()) {
                    continue;
                }
                List<String> cells = split(line);
                if (header == null) {
                    header = cells;
                    if (!header.equals(COLUMNS)) {
                        throw new IOException(path.getFileName() + " line " + lineNo + ": header must be "
                                + COLUMNS + ", got " + header);
                    }
                    continue;
                }
                if (cells.size() != header.size()) {
                    throw new IOException(path.getFileName() + " line " + lineNo + ": expected " + header.size()
                            + " cells, got " + cells.size());
                }
                Map<String, String> m = new LinkedHashMap<>();
                for (int c = 0; c < cells.size(); c++) {
                    if (!cells.get(c).isEmpty()) {
                        m.put(header.get(c), cells.get(c));
                    }
                }
                out.add(new Row(m));
            }
        }
        return out;
    }

    /** Splits one RFC 4180 line (no embedded newlines). */
    static List<String> split(String line) {
        List<String> cells = new ArrayList<>();
        StringBuilder sb = new StringBuilder();
        boolean quoted = false;
        for (int i = 0; i < line.length(); i++) {
            char ch = line.charAt(i);
            if (quoted) {
                if (ch == '"') {
                    if (i + 1 < line.length() && line.charAt(i + 1) == '"') {
                        sb.append('"');
                        i++;
                    } else {
                        quoted = false;
                    }
                } else {
                    sb.append(ch);
                }
            } else if (ch == '"') {
                quoted = true;
            } else if (ch == ',') {
                cells.add(sb.toString());
                sb.setLength(0);
            } else {
                sb.append(ch);
            }
        }
        cells.add(sb.toString());
        return Arrays.asList(cells.toArray(new String[0]));
    }
}
