package org.turnmark.app.phantom;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.attribute.PosixFilePermissions;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.stream.Stream;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;

import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.nifti.NiftiDatatype;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Writes a {@link PhantomCase} as a case folder, atomically: everything is written into a temporary
 * sibling folder that is then renamed to the target, so the target never holds a partial case.
 *
 * <pre>
 * DIR/case.json                     planner case file (docs/case-format.md)
 * DIR/README.md                     what the case holds, truth conditions, CC0 dedication
 * DIR/prone.nii.gz, supine.nii.gz   MR-like images (int16)
 * DIR/prone_labels.nii.gz, supine_labels.nii.gz   labels (uint8)
 * DIR/truth/reference_labels.nii.gz gravity-free reference anatomy
 * DIR/truth/displacement_prone_to_supine.nii.gz (+ .json sidecar)   intent 1006, RAS mm
 * DIR/truth/landmarks.csv, lesion_centroids.csv, truth.json
 * </pre>
 */
public final class PhantomWriter {

    /** Name of the displacement field inside {@code truth/}. */
    public static final String DISPLACEMENT = "displacement_prone_to_supine.nii.gz";

    private PhantomWriter() {
    }

    /**
     * Writes the case folder.
     *
     * @param c         the case
     * @param dir       target folder; must not exist unless {@code overwrite}
     * @param caseId    name used in case.json and the README
     * @param command   the command line that regenerates the case (for the README)
     * @param overwrite replace an existing folder
     * @throws IOException if the folder exists (and not overwrite) or writing fails; nothing is left
     *                     under {@code dir} that was not there before
     */
    public static void write(PhantomCase c, Path dir, String caseId, String command, boolean overwrite)
            throws IOException {
        Path target = dir.toAbsolutePath().normalize();
        if (Files.exists(target) && !overwrite) {
            throw new IOException("output folder " + target + " exists; choose another or pass --overwrite");
        }
        Path parent = target.getParent();
        Files.createDirectories(parent);
        Path tmp = Files.createTempDirectory(parent, "." + target.getFileName() + ".tmp-");
        try {
            writeInto(c, tmp, caseId, command);
            makeReadable(tmp);
            if (Files.exists(target)) {
                Path old = Files.createTempDirectory(parent, "." + target.getFileName() + ".old-");
                Files.delete(old);
                Files.move(target, old, StandardCopyOption.ATOMIC_MOVE);
                try {
                    Files.move(tmp, target, StandardCopyOption.ATOMIC_MOVE);
                } catch (IOException | RuntimeException e) {
                    // Put the previous case back so a failed overwrite leaves the folder as it was.
                    Files.move(old, target, StandardCopyOption.ATOMIC_MOVE);
                    throw e;
                }
                deleteTree(old);
            } else {
                Files.move(tmp, target, StandardCopyOption.ATOMIC_MOVE);
            }
        } catch (IOException | RuntimeException e) {
            deleteTree(tmp);
            throw e;
        }
    }

    private static void writeInto(PhantomCase c, Path d, String caseId, String command) throws IOException {
        Path truth = d.resolve("truth");
        Files.createDirectories(truth);
        var g = c.grid();
        NiftiWriter.writeVolume(d.resolve("prone.nii.gz"), new Volume(g, c.proneImage()), NiftiDatatype.INT16);
        NiftiWriter.writeVolume(d.resolve("supine.nii.gz"), new Volume(g, c.supineImage()), NiftiDatatype.INT16);
        NiftiWriter.writeVolume(d.resolve("prone_labels.nii.gz"), new Volume(g, toFloat(c.proneLabels())),
                NiftiDatatype.UINT8);
        NiftiWriter.writeVolume(d.resolve("supine_labels.nii.gz"), new Volume(g, toFloat(c.supineLabels())),
                NiftiDatatype.UINT8);
        NiftiWriter.writeVolume(truth.resolve("reference_labels.nii.gz"), new Volume(g, toFloat(c.referenceLabels())),
                NiftiDatatype.UINT8);
        float[][] u = c.displacement();
        NiftiWriter.writeDisplacementField(truth.resolve(DISPLACEMENT), new VectorField(g, u[0], u[1], u[2]),
                "prone->supine");
        ObjectMapper json = new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT);
        writeText(truth.resolve("displacement_prone_to_supine.json"), json.writeValueAsString(sidecar()));
        writeText(truth.resolve("landmarks.csv"), landmarksCsv(c));
        writeText(truth.resolve("lesion_centroids.csv"), lesionsCsv(c));
        writeText(truth.resolve("truth.json"), json.writeValueAsString(truthJson(c, command)));
        writeText(d.resolve("case.json"), json.writeValueAsString(caseJson(c, caseId)));
        writeText(d.resolve("README.md"), PhantomReadme.text(c, caseId, command));
    }

    private static Map<String, Object> sidecar() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("caution", ResearchUse.FULL);
        m.put("intent", "NIFTI_INTENT_DISPVECT (1006)");
        m.put("direction", "prone->supine");
        m.put("meaning", "for a point x (RAS mm) of the prone image, x + u(x) is the same material point in the"
                + " supine image");
        m.put("components", "RAS x, y, z in mm, stored as three planes");
        m.put("grid", "the prone image grid");
        m.put("tissue", "labels 1, 2, 3, 5: through the reference anatomy (prone inverse, then supine forward)");
        m.put("chest_wall_and_air", "rigid torso placement of the supine image (rotation and table shift)");
        m.put("quantum_mm", PhantomGenerator.DISPLACEMENT_QUANTUM_MM);
        return m;
    }

    private static String landmarksCsv(PhantomCase c) {
        StringBuilder sb = new StringBuilder();
        sb.append("# ").append(ResearchUse.SHORT).append('\n');
        sb.append("# Duct branch points of a synthetic phantom (invented data); RAS mm; reference = gravity-free\n");
        sb.append("id,prone_x_mm,prone_y_mm,prone_z_mm,supine_x_mm,supine_y_mm,supine_z_mm,"
                + "reference_x_mm,reference_y_mm,reference_z_mm\n");
        double[] p = c.landmarkProne();
        double[] s = c.landmarkSupine();
        double[] r = c.landmarkReference();
        for (int m = 0; m < p.length / 3; m++) {
            sb.append("B").append(m + 1);
            for (double[] a : new double[][] {p, s, r}) {
                for (int d = 0; d < 3; d++) {
                    sb.append(',').append(fmt(a[3 * m + d]));
                }
            }
            sb.append('\n');
        }
        return sb.toString();
    }

    private static String lesionsCsv(PhantomCase c) {
        StringBuilder sb = new StringBuilder();
        sb.append("# ").append(ResearchUse.SHORT).append('\n');
        sb.append("# True lesion centroids of a synthetic phantom (invented data); RAS mm\n");
        sb.append("id,side,diameter_mm,prone_x_mm,prone_y_mm,prone_z_mm,supine_x_mm,supine_y_mm,supine_z_mm,"
                + "reference_x_mm,reference_y_mm,reference_z_mm\n");
        for (int l = 0; l < c.anatomy().lesionCount(); l++) {
            sb.append("L").append(l + 1).append(',').append(c.anatomy().lesionSide(l)).append(',')
                    .append(fmt(c.options().lesionDiameterMm()));
            for (double[] a : new double[][] {c.lesionProne(), c.lesionSupine(), c.lesionReference()}) {
                for (int d = 0; d < 3; d++) {
                    sb.append(',').append(fmt(a[3 * l + d]));
                }
            }
            sb.append('\n');
        }
        return sb.toString();
    }

    private static Map<String, Object> truthJson(PhantomCase c, String command) {
        PhantomOptions o = c.options();
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("caution", ResearchUse.FULL);
        m.put("data", "synthetic phantom, invented anatomy; no patient data");
        m.put("command", command);
        Map<String, Object> opts = new LinkedHashMap<>();
        opts.put("seed", o.seed());
        opts.put("spacing_mm", o.spacingMm());
        opts.put("breasts", o.breasts());
        opts.put("side", o.side());
        opts.put("breast_volume_ml", o.breastVolumeMl());
        opts.put("projection", o.projection());
        opts.put("ptosis", o.ptosis());
        opts.put("lesion_mm", o.lesionDiameterMm());
        opts.put("lesions", o.lesionCount());
        opts.put("contrast", o.contrast().name().toLowerCase(Locale.ROOT));
        opts.put("snr", o.snr());
        opts.put("element_mm", o.elementMm());
        if (o.truth() != PhantomOptions.Truth.DEFAULT) {
            opts.put("truth", o.truth().key());
        }
        if (o.fieldOfView() != PhantomOptions.FieldOfView.BREAST) {
            opts.put("field_of_view", o.fieldOfView().key());
        }
        m.put("options", opts);
        m.put("snr_definition", "noise sigma = mean noise-free signal over breast-tissue voxels (labels 1, 2, 3, 5)"
                + " / SNR; Rician magnitude noise");
        Map<String, Object> sigma = new LinkedHashMap<>();
        sigma.put("prone", round(c.proneNoiseSigma()));
        sigma.put("supine", round(c.supineNoiseSigma()));
        m.put("noise_sigma", sigma);
        m.put("truth_conditions", PhantomReadme.conditionsJson(c.conditions()));
        List<Object> lesions = new ArrayList<>();
        for (int l = 0; l < c.anatomy().lesionCount(); l++) {
            Map<String, Object> e = new LinkedHashMap<>();
            e.put("id", "L" + (l + 1));
            e.put("side", c.anatomy().lesionSide(l));
            e.put("diameter_mm", o.lesionDiameterMm());
            e.put("reference_ras_mm", triple(c.lesionReference(), l));
            e.put("prone_ras_mm", triple(c.lesionProne(), l));
            e.put("supine_ras_mm", triple(c.lesionSupine(), l));
            lesions.add(e);
        }
        m.put("lesions", lesions);
        List<Object> nipples = new ArrayList<>();
        for (int b = 0; b < c.anatomy().breastCount(); b++) {
            Map<String, Object> e = new LinkedHashMap<>();
            e.put("side", c.anatomy().side(b));
            e.put("reference_ras_mm", triple(c.nippleReference(), b));
            e.put("prone_ras_mm", triple(c.nippleProne(), b));
            e.put("supine_ras_mm", triple(c.nippleSupine(), b));
            nipples.add(e);
        }
        m.put("nipples", nipples);
        m.put("landmarks", "landmarks.csv (" + c.landmarkProne().length / 3 + " duct branch points)");
        m.put("units", "RAS+ millimetres (x right, y anterior, z superior), voxel centres");
        return m;
    }

    private static Map<String, Object> caseJson(PhantomCase c, String caseId) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("schema_version", 1);
        m.put("case_id", caseId);
        m.put("description", "Synthetic phantom (invented data, research use only): " + c.options().breasts()
                + " breast(s), " + c.anatomy().lesionCount() + " lesion(s) of " + fmt(c.options().lesionDiameterMm())
                + " mm, " + c.options().contrast().name().toLowerCase(Locale.ROOT) + " contrast.");
        m.put("prone_image", "prone.nii.gz");
        m.put("supine_image", "supine.nii.gz");
        m.put("labels", "prone_labels.nii.gz");
        m.put("laterality", c.anatomy().breastCount() == 2 ? "both" : c.anatomy().side(0));
        List<Object> lesions = new ArrayList<>();
        List<Object> truthLesions = new ArrayList<>();
        for (int l = 0; l < c.anatomy().lesionCount(); l++) {
            Map<String, Object> e = new LinkedHashMap<>();
            e.put("id", "L" + (l + 1));
            e.put("position_ras_mm", triple(c.lesionProne(), l));
            e.put("side", c.anatomy().lesionSide(l));
            e.put("label", 5);
            lesions.add(e);
            Map<String, Object> t = new LinkedHashMap<>();
            t.put("id", "L" + (l + 1));
            t.put("prone_ras_mm", triple(c.lesionProne(), l));
            t.put("supine_ras_mm", triple(c.lesionSupine(), l));
            truthLesions.add(t);
        }
        m.put("lesions", lesions);
        List<Object> nipples = new ArrayList<>();
        for (int b = 0; b < c.anatomy().breastCount(); b++) {
            Map<String, Object> e = new LinkedHashMap<>();
            e.put("side", c.anatomy().side(b));
            e.put("position_ras_mm", triple(c.nippleProne(), b));
            nipples.add(e);
        }
        m.put("nipples", nipples);
        Map<String, Object> truth = new LinkedHashMap<>();
        truth.put("displacement", "truth/" + DISPLACEMENT);
        truth.put("lesion_centroids", "truth/lesion_centroids.csv");
        truth.put("landmarks", "truth/landmarks.csv");
        truth.put("lesions", truthLesions);
        truth.put("notes", c.options().truth() == PhantomOptions.Truth.PRIORS
                ? "Synthetic truth drawn from the planner's default priors; the draw is listed in README.md and"
                        + " truth/truth.json."
                : "Synthetic truth; conditions that differ from the planner's defaults are listed in"
                        + " README.md and truth/truth.json.");
        m.put("truth", truth);
        return m;
    }

    static List<Double> triple(double[] a, int i) {
        return List.of(round(a[3 * i]), round(a[3 * i + 1]), round(a[3 * i + 2]));
    }

    /** Rounds to 0.001 (mm): far below a voxel, and stable text. */
    static double round(double v) {
        return Math.rint(v * 1000) / 1000;
    }

    static String fmt(double v) {
        return String.format(Locale.ROOT, "%.3f", v);
    }

    private static float[] toFloat(byte[] b) {
        float[] f = new float[b.length];
        for (int i = 0; i < b.length; i++) {
            f[i] = b[i] & 0xFF;
        }
        return f;
    }

    private static void writeText(Path p, String s) throws IOException {
        Files.writeString(p, s.endsWith("\n") ? s : s + "\n", StandardCharsets.UTF_8);
    }

    /** Temporary files and folders are private to the owner; the finished case is world-readable. */
    private static void makeReadable(Path root) throws IOException {
        if (!root.getFileSystem().supportedFileAttributeViews().contains("posix")) {
            return;
        }
        try (Stream<Path> s = Files.walk(root)) {
            for (Path x : (Iterable<Path>) s::iterator) {
                Files.setPosixFilePermissions(x, PosixFilePermissions.fromString(
                        Files.isDirectory(x) ? "rwxr-xr-x" : "rw-r--r--"));
            }
        }
    }

    private static void deleteTree(Path p) {
        if (!Files.exists(p)) {
            return;
        }
        try (Stream<Path> s = Files.walk(p)) {
            s.sorted((a, b) -> b.getNameCount() - a.getNameCount()).forEach(x -> {
                try {
                    Files.deleteIfExists(x);
                } catch (IOException e) {
                    throw new UncheckedIOException(e);
                }
            });
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
