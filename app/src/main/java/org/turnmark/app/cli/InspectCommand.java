package org.turnmark.app.cli;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.ByteOrder;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.Callable;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.nifti.NiftiHeader;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.nifti.NiftiVectorField;
import org.turnmark.registration.nifti.NiftiVolume;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.VolumeStatistics;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;

import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

/**
 * {@code turnmark inspect FILE...}: what a NIfTI-1 file holds and how Turnmark reads it: dimensions,
 * spacing (mm), datatype, orientation letters, the voxel→world matrix (RAS+ mm) and which header
 * transform gave it, intensity range and percentiles, and warnings. For a vector field the
 * statistics are of the vector length (mm). A file that cannot be read gets one line on stderr
 * naming it and the field at fault; the other files are still inspected and the exit code is 2.
 */
@Command(name = "inspect",
        header = "Shows how Turnmark reads NIfTI-1 images.",
        mixinStandardHelpOptions = true,
        description = {
            "Shows how Turnmark reads NIfTI-1 images (.nii, .nii.gz, .hdr/.img): dimensions, spacing (mm),",
            "datatype, orientation, voxel->world matrix (RAS+ mm) and its source (sform/qform/pixdim),",
            "intensity range and percentiles, and warnings. Exit code 2 if any file cannot be read.",
            "",
            Caution.SHORT})
final class InspectCommand implements Callable<Integer> {

    /** Percentile levels reported (%). */
    static final double[] PERCENTILES = {1, 5, 25, 50, 75, 95, 99};

    @CommandLine.Spec
    private CommandLine.Model.CommandSpec spec;

    @Parameters(arity = "1..*", paramLabel = "FILE", description = "NIfTI-1 files to inspect.")
    private List<Path> files;

    @Option(names = "--json", description = "Print one JSON object per file (one per line) instead of text.")
    private boolean json;

    @Option(names = "--frame", defaultValue = "0",
            description = "Frame of a 4-D image whose intensities are summarised (from 0; default ${DEFAULT-VALUE}).")
    private int frame;

    private final ObjectMapper mapper = new ObjectMapper();

    @Override
    public Integer call() throws JsonProcessingException {
        PrintWriter out = spec.commandLine().getOut();
        PrintWriter err = spec.commandLine().getErr();
        NiftiReader reader = new NiftiReader();
        int failed = 0;
        for (Path f : files) {
            Report r;
            try {
                r = inspect(reader, f);
            } catch (IOException e) {
                failed++;
                String msg = e.getMessage() == null ? e.getClass().getSimpleName() : e.getMessage();
                if (!msg.contains(f.toString())) {
                    msg = f + ": " + msg;
                }
                err.println("turnmark inspect: " + msg);
                if (json) {
                    ObjectNode o = mapper.createObjectNode();
                    o.put("file", f.toString());
                    o.put("error", msg);
                    out.println(mapper.writeValueAsString(o));
                }
                continue;
            }
            if (json) {
                out.println(mapper.writeValueAsString(r.toJson(mapper)));
            } else {
                r.print(out);
            }
        }
        if (!json) {
            out.println(Caution.SHORT);
        }
        out.flush();
        err.flush();
        return failed == 0 ? 0 : TurnmarkCommand.EXIT_BAD_INPUT;
    }

    private Report inspect(NiftiReader reader, Path f) throws IOException {
        NiftiHeader h = reader.readHeader(f);
        Report r = new Report();
        r.file = f.toString();
        r.header = h;
        if (h.isVectorField()) {
            NiftiVectorField v = reader.readVectorField(f);
            r.warnings = v.warnings();
            r.valueKind = "vector length";
            r.valueUnit = "mm";
            r.frame = 0;
            r.stats = statistics(magnitude(v.field()));
        } else {
            NiftiVolume v = reader.readVolume(f, frame);
            r.warnings = v.warnings();
            r.valueKind = "intensity";
            r.valueUnit = "image units";
            r.frame = v.frame();
            r.stats = statistics(v.volume().data());
        }
        return r;
    }

    private static float[] magnitude(VectorField v) {
        float[] x = v.x();
        float[] y = v.y();
        float[] z = v.z();
        float[] m = new float[x.length];
        for (int n = 0; n < m.length; n++) {
            m[n] = (float) Math.sqrt((double) x[n] * x[n] + (double) y[n] * y[n] + (double) z[n] * z[n]);
        }
        return m;
    }

    /** Statistics over the finite values; null if there are none. */
    private static VolumeStatistics statistics(float[] data) {
        long finite = 0;
        for (float v : data) {
            if (Float.isFinite(v)) {
                finite++;
            }
        }
        if (finite == 0) {
            return null;
        }
        float[] mask = null;
        if (finite < data.length) {
            mask = new float[data.length];
            for (int n = 0; n < data.length; n++) {
                mask[n] = Float.isFinite(data[n]) ? 1f : 0f;
            }
        }
        return VolumeStatistics.of(data, mask, PERCENTILES);
    }

    /** Everything reported for one file. */
    private static final class Report {
        String file;
        NiftiHeader header;
        List<String> warnings;
        String valueKind;
        String valueUnit;
        int frame;
        VolumeStatistics stats;

        int[] shape() {
            int[] d = header.dim();
            return Arrays.copyOfRange(d, 1, d[0] + 1);
        }

        ObjectNode toJson(ObjectMapper mapper) {
            NiftiHeader h = header;
            ObjectNode o = mapper.createObjectNode();
            o.put("file", file);
            ArrayNode dims = o.putArray("dims");
            for (int d : shape()) {
                dims.add(d);
            }
            ArrayNode spacing = o.putArray("spacing_mm");
            for (double s : h.spacingMm()) {
                spacing.add(s);
            }
            o.put("datatype", h.datatype().label());
            o.put("byte_order", h.byteOrder() == ByteOrder.BIG_ENDIAN ? "big-endian" : "little-endian");
            o.put("scl_slope", h.slope());
            o.put("scl_inter", h.intercept());
            o.put("orientation", h.orientation());
            ArrayNode m = o.putArray("voxel_to_world");
            double[] a = h.voxelToWorld().toRowMajor();
            for (int r = 0; r < 4; r++) {
                ArrayNode row = m.addArray();
                for (int c = 0; c < 4; c++) {
                    row.add(a[4 * r + c]);
                }
            }
            o.put("transform_source", h.transformSource().label());
            o.put("qform_code", h.qformCode());
            o.put("sform_code", h.sformCode());
            o.put("intent_code", h.intentCode());
            o.put("intent_name", h.intentName());
            o.put("descrip", h.descrip());
            o.put("frame", frame);
            o.put("values", valueKind);
            o.put("value_unit", valueUnit);
            if (stats != null) {
                o.put("voxels", stats.count());
                o.put("min", stats.min());
                o.put("max", stats.max());
                o.put("mean", stats.mean());
                ObjectNode p = o.putObject("percentiles");
                double[] lv = stats.percentileLevels();
                double[] pv = stats.percentileValues();
                for (int n = 0; n < lv.length; n++) {
                    p.put("p" + label(lv[n]), pv[n]);
                }
            } else {
                o.putNull("min");
                o.putNull("max");
            }
            ArrayNode w = o.putArray("warnings");
            warnings.forEach(w::add);
            o.put("caution", ResearchUse.SHORT);
            return o;
        }

        void print(PrintWriter out) {
            NiftiHeader h = header;
            int[] shape = shape();
            out.println(file);
            StringBuilder dims = new StringBuilder();
            for (int n = 0; n < shape.length; n++) {
                dims.append(n == 0 ? "" : " x ").append(shape[n]);
            }
            String kind = h.isVectorField() ? " (3-component vector field)"
                    : h.frames() > 1 ? " (" + h.frames() + " frames; statistics of frame " + frame + ")" : "";
            out.println("  dimensions:     " + dims + " voxels" + kind);
            double[] s = h.spacingMm();
            out.println(String.format(Locale.ROOT, "  spacing:        %s x %s x %s mm", num(s[0]), num(s[1]), num(s[2])));
            String scaling = h.isScaled() ? ", scaled: value = " + num(h.slope()) + " x stored + " + num(h.intercept()) : "";
            out.println("  datatype:       " + h.datatype().label() + " ("
                    + (h.byteOrder() == ByteOrder.BIG_ENDIAN ? "big" : "little") + "-endian" + scaling + ")");
            out.println("  orientation:    " + h.orientation() + " (voxel axes i, j, k point to these patient directions)");
            out.println("  transform:      " + h.transformSource().label() + " (sform_code " + h.sformCode()
                    + ", qform_code " + h.qformCode() + ")");
            out.println("  voxel->world (RAS+ mm):");
            Affine3D a = h.voxelToWorld();
            for (int r = 0; r < 4; r++) {
                out.println(String.format(Locale.ROOT, "    [ %11.5f %11.5f %11.5f %11.5f ]",
                        a.get(r, 0), a.get(r, 1), a.get(r, 2), a.get(r, 3)));
            }
            if (h.intentCode() != 0) {
                out.println("  intent:         " + h.intentCode()
                        + (h.intentName().isEmpty() ? "" : " \"" + h.intentName() + "\""));
            }
            if (stats == null) {
                out.println("  " + pad(valueKind + ":") + "no finite values");
            } else {
                out.println("  " + pad(valueKind + ":") + "min " + num(stats.min()) + ", max " + num(stats.max())
                        + ", mean " + num(stats.mean()) + " " + valueUnit + " (" + stats.count() + " voxels)");
                StringBuilder p = new StringBuilder();
                double[] lv = stats.percentileLevels();
                double[] pv = stats.percentileValues();
                for (int n = 0; n < lv.length; n++) {
                    p.append(n == 0 ? "" : ", ").append("p").append(label(lv[n])).append(' ').append(num(pv[n]));
                }
                out.println("  percentiles:    " + p + " " + valueUnit);
            }
            if (warnings.isEmpty()) {
                out.println("  warnings:       none");
            } else {
                out.println("  warnings:");
                for (String w : warnings) {
                    out.println("    - " + w);
                }
            }
        }

        private static String pad(String s) {
            StringBuilder b = new StringBuilder(s);
            while (b.length() < 16) {
                b.append(' ');
            }
            return b.toString();
        }
    }

    private static String label(double level) {
        return level == Math.rint(level) ? Long.toString((long) level) : Double.toString(level);
    }

    /** Six significant digits, without trailing zeros. */
    static String num(double v) {
        if (v == 0) {
            return "0";
        }
        String s = String.format(Locale.ROOT, "%.6g", v);
        if (s.contains("e") || s.contains("E")) {
            return s;
        }
        if (s.contains(".")) {
            s = s.replaceAll("0+$", "");
            if (s.endsWith(".")) {
                s = s.substring(0, s.length() - 1);
            }
        }
        return s;
    }

    static List<String> percentileKeys() {
        List<String> k = new ArrayList<>();
        for (double p : PERCENTILES) {
            k.add("p" + label(p));
        }
        return k;
    }
}
