package org.turnmark.app.pipeline;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Set;
import java.util.stream.Collectors;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.JsonMappingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.exc.UnrecognizedPropertyException;
import com.fasterxml.jackson.databind.json.JsonMapper;

import org.turnmark.app.pipeline.CaseFile.LesionMark;
import org.turnmark.app.pipeline.CaseFile.ModelOptions;
import org.turnmark.app.pipeline.CaseFile.NippleMark;
import org.turnmark.app.pipeline.CaseFile.NuPrior;
import org.turnmark.app.pipeline.CaseFile.Priors;
import org.turnmark.app.pipeline.CaseFile.TissuePrior;
import org.turnmark.app.pipeline.CaseFile.Truth;
import org.turnmark.app.pipeline.CaseFile.TruthLesion;
import org.turnmark.app.pipeline.CaseFile.UncertaintyOptions;

/**
 * Reads, validates and normalises a case file (schema version {@value CaseFile#SCHEMA_VERSION},
 * documented in {@code docs/case-format.md}).
 *
 * <p>Strict by design: unknown keys, trailing content, wrong types, missing required keys, values
 * out of range and referenced files that do not exist are {@link CaseFormatException}s naming the key.
 * Relative paths resolve against the folder holding the case file. Defaults are filled in so the
 * returned case states every value the planner uses. Thread safe (stateless).
 */
public final class CaseFileReader {

    /** Prior defaults. Stiffness medians: REFERENCE §6 (gravity-fitted neo-Hookean μ, Carter 2006, from memory). */
    static final TissuePrior DEFAULT_FAT = new TissuePrior(0.3, 1.6, 911.0);
    /** Fibroglandular: μ ≈ 0.4 kPa (Carter 2006, from memory), density 1041 kg/m³ (from memory). */
    static final TissuePrior DEFAULT_FIBROGLANDULAR = new TissuePrior(0.4, 1.6, 1041.0);
    /** Skin: E ≈ 56 kPa in vivo (REFERENCE §6), μ = E / (2(1 + ν)) ≈ 19 kPa. */
    static final TissuePrior DEFAULT_SKIN = new TissuePrior(19.0, 1.5, 1100.0);
    /** Lesion: carcinomas 3–6× fibroglandular stiffness (Samani 2007): median 4 × 0.4 kPa. */
    static final TissuePrior DEFAULT_LESION = new TissuePrior(1.6, 2.0, 1050.0);
    /** Near-incompressible range 0.45–0.499 (REFERENCE §6); nominal 0.49 (κ/μ ≈ 50). */
    static final NuPrior DEFAULT_NU = new NuPrior(0.45, 0.495, 0.49);
    /** A fully fixed base is a poor assumption; sliding is usually better (REFERENCE §6). */
    static final double DEFAULT_SLIDING_PROBABILITY = 0.7;
    /** Positioning on the table: gravity within a few degrees (issue text; common practice). */
    static final double DEFAULT_GRAVITY_SD_DEG = 3.0;
    /** Marking a lesion centroid by hand: about one voxel of a 1.5 mm scan (assumption, stated in docs). */
    static final double DEFAULT_LESION_MARKING_SD_MM = 1.5;
    /**
     * The registration's own error after a mechanical start, isotropic (mm). Fitted by maximum likelihood
     * with {@link SupineStage#HYBRID_MECHANICS_WEIGHT} on the calibration runs at the default 6 mm elements
     * with the field-of-view cut held (2026-12-02, seeds 131–214 pooled, 69 lesions; ML 0.630 mm, SE
     * 0.212 mm); leave-one-out check: 63 of 69 left-out lesions inside the 95 % ellipsoid (docs/benchmarks.md,
     * "Calibration with the field-of-view cut held").
     */
    static final double DEFAULT_REGISTRATION_SD_MM = 0.63;
    /**
     * Isotropic error (mm) added to the mechanics-only prediction in the supine image frame: the rigid
     * alignment's error and the model error the sampled priors do not span (mesh, boundary conditions).
     * Fitted by maximum likelihood, covariance R Σ_m Rᵀ + s² I, on the same pooled runs (69 lesions; ML
     * 0.817 mm, SE 0.263 mm); leave-one-out: 65 of 69 inside the 95 % ellipsoid, mean d² 2.97.
     */
    static final double DEFAULT_MECHANICS_SUPINE_SD_MM = 0.82;
    /**
     * Isotropic error (mm) added to the mechanics-only prediction in the prone image frame (chest wall held
     * in place), with the sampled covariance scaled by {@link #DEFAULT_MECHANICS_PRONE_SCALE}. Fitted by
     * maximum likelihood, covariance k Σ_m + s² I, on the pooled 6 mm runs, seeds 131–250 (110 lesions): s
     * goes to its lower bound (0.01 mm, SE 0.30 mm), so the default is 0. The earlier form Σ_m + s² I
     * (s = 1.23 mm) held 62 of 69 (leave-one-out) and then 30 of 36 unseen lesions (seeds 215–250): too
     * narrow, because the errors grow with the sampled spread faster than an added constant can follow.
     */
    static final double DEFAULT_MECHANICS_PRONE_SD_MM = 0.0;
    /**
     * Factor on the sampled covariance of the mechanics-only prediction in the prone image frame: the
     * sampled priors span about 1/√1.72 = 76 % of the error's spread. ML fit on seeds 131–250 (110 lesions):
     * k = 1.7245 (SE 0.134); AIC 1079.3 against 1121.9 for Σ_m + s² I; leave-one-out 99 of 110 inside the
     * 95 % ellipsoid (90.0 %), mean d² 3.07 (docs/benchmarks.md).
     */
    static final double DEFAULT_MECHANICS_PRONE_SCALE = 1.72;
    /**
     * The same factor for images that show the chest wall across the chest (chest-wall label spanning at
     * least {@link SupineStage#CHEST_WALL_MIN_SPAN_MM} left to right): there the modelled tissue covers the
     * whole chest wall and the mechanics is further off. ML fit of (1 + w) Σ_m + s² I on 31 chest
     * field-of-view phantoms (seeds 131–162): 1 + w = 2.37 (w SE 0.35), s at its lower bound; leave-one-out 28
     * of 31 inside the 95 % ellipsoid; unseen seeds 163–178: 15 of 16 (docs/benchmarks.md, "Chest field of
     * view").
     */
    static final double DEFAULT_MECHANICS_PRONE_SCALE_WIDE_FIELD = 2.37;

    /** Largest sample count accepted (a plan with more would take hours). */
    public static final int MAX_SAMPLES = 1024;

    private static final double MAX_ELEMENT_SIZE_MM = 50.0;

    private final ObjectMapper mapper;

    public CaseFileReader() {
        this.mapper = mapper();
    }

    /** The strict mapper used for case files (also used to write them back). */
    public static ObjectMapper mapper() {
        return JsonMapper.builder()
                .enable(DeserializationFeature.FAIL_ON_UNKNOWN_PROPERTIES)
                .enable(DeserializationFeature.FAIL_ON_NULL_FOR_PRIMITIVES)
                .enable(DeserializationFeature.FAIL_ON_TRAILING_TOKENS)
                .enable(DeserializationFeature.FAIL_ON_READING_DUP_TREE_KEY)
                .enable(com.fasterxml.jackson.core.StreamReadFeature.STRICT_DUPLICATE_DETECTION)
                .enable(SerializationFeature.INDENT_OUTPUT)
                .build();
    }

    /**
     * Reads and validates a case file.
     *
     * @param caseFile path to the JSON file
     * @return the normalised case (absolute paths, defaults filled in)
     * @throws CaseFormatException for any problem, naming the key
     */
    public CaseFile read(Path caseFile) {
        Path file = caseFile.toAbsolutePath().normalize();
        if (!Files.isRegularFile(file)) {
            throw new CaseFormatException(file, "", "case file not found: " + file);
        }
        CaseFile raw;
        try {
            raw = mapper.readValue(file.toFile(), CaseFile.class);
        } catch (UnrecognizedPropertyException e) {
            String known = e.getKnownPropertyIds() == null ? "" : e.getKnownPropertyIds().stream()
                    .map(Object::toString).sorted().collect(Collectors.joining(", "));
            throw new CaseFormatException(file, jsonPath(e), "unknown key '" + e.getPropertyName()
                    + "' (known keys here: " + known + ")", e);
        } catch (JsonMappingException e) {
            throw new CaseFormatException(file, jsonPath(e), "wrong type or value: " + e.getOriginalMessage(), e);
        } catch (JsonProcessingException e) {
            throw new CaseFormatException(file, "", "not valid JSON at line " + e.getLocation().getLineNr()
                    + ", column " + e.getLocation().getColumnNr() + ": " + e.getOriginalMessage(), e);
        } catch (IOException e) {
            throw new CaseFormatException(file, "", "cannot read: " + e.getMessage(), e);
        }
        if (raw == null) {
            throw new CaseFormatException(file, "", "empty case file");
        }
        return new Validator(file).normalise(raw);
    }

    /** Writes a case as JSON to {@code out} (not atomic; callers write into a temporary folder). */
    public void write(CaseFile c, Path out) throws IOException {
        mapper.writeValue(out.toFile(), c);
    }

    private static String jsonPath(JsonMappingException e) {
        StringBuilder sb = new StringBuilder();
        for (JsonMappingException.Reference r : e.getPath()) {
            if (r.getFieldName() != null) {
                if (sb.length() > 0) {
                    sb.append('.');
                }
                sb.append(r.getFieldName());
            } else if (r.getIndex() >= 0) {
                sb.append('[').append(r.getIndex()).append(']');
            }
        }
        return sb.toString();
    }

    /** Validation with the case file's folder for path resolution. */
    private static final class Validator {
        private final Path file;
        private final Path dir;

        Validator(Path file) {
            this.file = file;
            this.dir = file.getParent();
        }

        CaseFile normalise(CaseFile c) {
            if (c.schemaVersion() == null) {
                throw fail("schema_version", "required key missing (expected " + CaseFile.SCHEMA_VERSION + ")");
            }
            if (c.schemaVersion() != CaseFile.SCHEMA_VERSION) {
                throw fail("schema_version", "unsupported version " + c.schemaVersion() + "; this Turnmark reads "
                        + CaseFile.SCHEMA_VERSION);
            }
            String prone = existingFile("prone_image", c.proneImage(), true);
            String supine = existingFile("supine_image", c.supineImage(), false);
            String labels = existingFile("labels", c.labels(), false);
            String laterality = side("laterality", c.laterality(), true);
            List<LesionMark> lesions = lesions(c.lesions());
            List<NippleMark> nipples = nipples(c.nipples());
            List<double[]> plane = plane(c.chestWallPlaneRasMm());
            ModelOptions model = model(c.model());
            Priors priors = priors(c.priors());
            UncertaintyOptions unc = uncertainty(c.uncertainty());
            String align = c.rigidAlignment() == null ? CaseFile.ALIGN_WHOLE_IMAGE
                    : c.rigidAlignment().trim().toLowerCase(Locale.ROOT);
            if (!align.equals(CaseFile.ALIGN_WHOLE_IMAGE) && !align.equals(CaseFile.ALIGN_CHEST_WALL)) {
                throw fail("rigid_alignment", "expected \"" + CaseFile.ALIGN_WHOLE_IMAGE + "\" or \""
                        + CaseFile.ALIGN_CHEST_WALL + "\", got \"" + c.rigidAlignment() + "\"");
            }
            String output = c.output() == null ? null : dir.resolve(c.output()).normalize().toString();
            Truth truth = truth(c.truth());
            String caseId = c.caseId();
            if (caseId == null || caseId.isBlank()) {
                String name = dir.getFileName() == null ? "case" : dir.getFileName().toString();
                caseId = name;
            }
            return new CaseFile(CaseFile.SCHEMA_VERSION, caseId, c.description(), prone, supine, labels, laterality,
                    lesions, nipples, plane, model, priors, unc, align, output, truth);
        }

        private CaseFormatException fail(String key, String problem) {
            return new CaseFormatException(file, key, problem);
        }

        private String existingFile(String key, String value, boolean required) {
            if (value == null) {
                if (required) {
                    throw fail(key, "required key missing (expected a path to a NIfTI image)");
                }
                return null;
            }
            if (value.isBlank()) {
                throw fail(key, "path is empty");
            }
            Path p = dir.resolve(value).normalize();
            if (!Files.exists(p)) {
                throw fail(key, "file not found: " + p);
            }
            if (!Files.isRegularFile(p) || !Files.isReadable(p)) {
                throw fail(key, "not a readable file: " + p);
            }
            return p.toString();
        }

        private String side(String key, String value, boolean allowBoth) {
            if (value == null) {
                throw fail(key, "required key missing (expected \"left\", \"right\""
                        + (allowBoth ? " or \"both\")" : ")"));
            }
            String v = value.trim().toLowerCase(Locale.ROOT);
            if (v.equals("left") || v.equals("right") || (allowBoth && v.equals("both"))) {
                return v;
            }
            throw fail(key, "expected \"left\", \"right\"" + (allowBoth ? " or \"both\"" : "") + ", got \""
                    + value + "\"");
        }

        private double[] point(String key, double[] p) {
            if (p.length != 3) {
                throw fail(key, "expected 3 numbers [x, y, z], got " + p.length);
            }
            for (int n = 0; n < 3; n++) {
                if (!Double.isFinite(p[n])) {
                    throw fail(key, "coordinate " + n + " must be finite, got " + p[n]);
                }
            }
            return p.clone();
        }

        private List<LesionMark> lesions(List<LesionMark> in) {
            if (in == null || in.isEmpty()) {
                throw fail("lesions", "at least one lesion mark is required");
            }
            Set<String> ids = new HashSet<>();
            List<LesionMark> out = new ArrayList<>();
            for (int n = 0; n < in.size(); n++) {
                LesionMark m = in.get(n);
                String k = "lesions[" + n + "]";
                if (m == null) {
                    throw fail(k, "null lesion mark");
                }
                if (m.id() == null || m.id().isBlank()) {
                    throw fail(k + ".id", "required key missing (a short name such as \"L1\")");
                }
                if (!m.id().matches("[A-Za-z0-9_.-]{1,32}")) {
                    throw fail(k + ".id", "use 1-32 letters, digits, '_', '.', '-', got \"" + m.id() + "\"");
                }
                if (!ids.add(m.id())) {
                    throw fail(k + ".id", "duplicate lesion id \"" + m.id() + "\"");
                }
                String s = m.side() == null ? null : side(k + ".side", m.side(), false);
                if ((m.positionRasMm() == null) == (m.positionVoxel() == null)) {
                    throw fail(k, "give exactly one of position_ras_mm or position_voxel");
                }
                double[] ras = m.positionRasMm() == null ? null : point(k + ".position_ras_mm", m.positionRasMm());
                double[] vox = m.positionVoxel() == null ? null : point(k + ".position_voxel", m.positionVoxel());
                if (m.radiusMm() != null && !(m.radiusMm() > 0 && m.radiusMm() <= 100)) {
                    throw fail(k + ".radius_mm", "expected a radius in (0, 100] mm, got " + m.radiusMm());
                }
                if (m.label() != null && !(m.label() >= 1 && m.label() <= 255)) {
                    throw fail(k + ".label", "expected a label value in [1, 255], got " + m.label());
                }
                double[] sup = m.supinePositionRasMm() == null ? null
                        : point(k + ".supine_position_ras_mm", m.supinePositionRasMm());
                out.add(new LesionMark(m.id(), s, ras, vox, m.radiusMm(), m.label(), sup));
            }
            return List.copyOf(out);
        }

        private List<NippleMark> nipples(List<NippleMark> in) {
            if (in == null) {
                return List.of();
            }
            Set<String> sides = new HashSet<>();
            List<NippleMark> out = new ArrayList<>();
            for (int n = 0; n < in.size(); n++) {
                NippleMark m = in.get(n);
                String k = "nipples[" + n + "]";
                if (m == null) {
                    throw fail(k, "null nipple mark");
                }
                String s = side(k + ".side", m.side(), false);
                if (!sides.add(s)) {
                    throw fail(k + ".side", "second nipple for the " + s + " side");
                }
                if (m.positionRasMm() == null) {
                    throw fail(k + ".position_ras_mm", "required key missing (expected [x, y, z] in RAS mm)");
                }
                out.add(new NippleMark(s, point(k + ".position_ras_mm", m.positionRasMm())));
            }
            return List.copyOf(out);
        }

        private List<double[]> plane(List<double[]> in) {
            if (in == null) {
                return null;
            }
            String k = "chest_wall_plane_ras_mm";
            if (in.size() != 3) {
                throw fail(k, "expected 3 points, got " + in.size());
            }
            double[] a = point(k + "[0]", in.get(0));
            double[] b = point(k + "[1]", in.get(1));
            double[] c = point(k + "[2]", in.get(2));
            double[] u = {b[0] - a[0], b[1] - a[1], b[2] - a[2]};
            double[] v = {c[0] - a[0], c[1] - a[1], c[2] - a[2]};
            double nx = u[1] * v[2] - u[2] * v[1];
            double ny = u[2] * v[0] - u[0] * v[2];
            double nz = u[0] * v[1] - u[1] * v[0];
            // Twice the triangle area in mm²; below 1 mm² the plane is not defined by these points.
            if (Math.sqrt(nx * nx + ny * ny + nz * nz) < 1.0) {
                throw fail(k, "the three points are (nearly) collinear; they do not define a plane");
            }
            return List.of(a, b, c);
        }

        private ModelOptions model(ModelOptions m) {
            double h = m == null || m.elementSizeMm() == null ? ModelOptions.DEFAULT_ELEMENT_SIZE_MM : m.elementSizeMm();
            if (!(h > 0 && h <= MAX_ELEMENT_SIZE_MM)) {
                throw fail("model.element_size_mm", "expected a size in (0, " + MAX_ELEMENT_SIZE_MM + "] mm, got " + h);
            }
            String cw = m == null || m.chestWall() == null ? null : m.chestWall().trim().toLowerCase(Locale.ROOT);
            if (cw != null && !cw.equals("fixed") && !cw.equals("sliding")) {
                throw fail("model.chest_wall", "expected \"fixed\" or \"sliding\", got \"" + m.chestWall() + "\"");
            }
            double g = m == null || m.gravityMS2() == null ? ModelOptions.DEFAULT_GRAVITY_M_S2 : m.gravityMS2();
            if (!(g > 0 && g < 100)) {
                throw fail("model.gravity_m_s2", "expected a value in (0, 100) m/s², got " + g);
            }
            return new ModelOptions(h, cw, g);
        }

        private Priors priors(Priors p) {
            Priors q = p == null ? new Priors(null, null, null, null, null, null, null, null, null, null, null, null, null) : p;
            TissuePrior fat = tissue("priors.fat", q.fat(), DEFAULT_FAT);
            TissuePrior gland = tissue("priors.fibroglandular", q.fibroglandular(), DEFAULT_FIBROGLANDULAR);
            TissuePrior skin = tissue("priors.skin", q.skin(), DEFAULT_SKIN);
            TissuePrior lesion = tissue("priors.lesion", q.lesion(), DEFAULT_LESION);
            NuPrior nu = nu(q.nu());
            double ps = orDefault(q.chestWallSlidingProbability(), DEFAULT_SLIDING_PROBABILITY);
            if (!(ps >= 0 && ps <= 1)) {
                throw fail("priors.chest_wall_sliding_probability", "expected a probability in [0, 1], got " + ps);
            }
            double gsd = nonNegative("priors.gravity_direction_sd_deg", q.gravityDirectionSdDeg(),
                    DEFAULT_GRAVITY_SD_DEG, 30);
            double lsd = nonNegative("priors.lesion_marking_sd_mm", q.lesionMarkingSdMm(),
                    DEFAULT_LESION_MARKING_SD_MM, 50);
            double rsd = nonNegative("priors.registration_sd_mm", q.registrationSdMm(), DEFAULT_REGISTRATION_SD_MM, 50);
            double msd = nonNegative("priors.mechanics_supine_sd_mm", q.mechanicsSupineSdMm(),
                    DEFAULT_MECHANICS_SUPINE_SD_MM, 50);
            double psd = nonNegative("priors.mechanics_prone_sd_mm", q.mechanicsProneSdMm(),
                    DEFAULT_MECHANICS_PRONE_SD_MM, 50);
            double pk = orDefault(q.mechanicsProneScale(), DEFAULT_MECHANICS_PRONE_SCALE);
            if (!(pk >= 1 && pk <= 10)) {
                throw fail("priors.mechanics_prone_scale", "expected a factor in [1, 10], got " + pk);
            }
            double pw = orDefault(q.mechanicsProneScaleWideField(), DEFAULT_MECHANICS_PRONE_SCALE_WIDE_FIELD);
            if (!(pw >= 1 && pw <= 10)) {
                throw fail("priors.mechanics_prone_scale_wide_field", "expected a factor in [1, 10], got " + pw);
            }
            return new Priors(fat, gland, skin, lesion, nu, ps, gsd, lsd, rsd, msd, psd, pk, pw);
        }

        private double nonNegative(String key, Double v, double def, double max) {
            double x = orDefault(v, def);
            if (!(x >= 0 && x <= max)) {
                throw fail(key, "expected a value in [0, " + max + "], got " + x);
            }
            return x;
        }

        private TissuePrior tissue(String key, TissuePrior t, TissuePrior def) {
            if (t == null) {
                return def;
            }
            double med = orDefault(t.muKpaMedian(), def.muKpaMedian());
            double gsd = orDefault(t.muGeometricSd(), def.muGeometricSd());
            double rho = orDefault(t.densityKgM3(), def.densityKgM3());
            if (!(med > 0 && med < 1e5)) {
                throw fail(key + ".mu_kpa_median", "expected a shear modulus in (0, 1e5) kPa, got " + med);
            }
            if (!(gsd >= 1 && gsd <= 10)) {
                throw fail(key + ".mu_geometric_sd", "expected a geometric SD in [1, 10] (1 = no spread), got " + gsd);
            }
            if (!(rho > 0 && rho < 1e5)) {
                throw fail(key + ".density_kg_m3", "expected a density in (0, 1e5) kg/m³, got " + rho);
            }
            return new TissuePrior(med, gsd, rho);
        }

        private NuPrior nu(NuPrior n) {
            if (n == null) {
                return DEFAULT_NU;
            }
            double lo = orDefault(n.min(), DEFAULT_NU.min());
            double hi = orDefault(n.max(), DEFAULT_NU.max());
            double nom = orDefault(n.nominal(), n.min() != null || n.max() != null ? 0.5 * (lo + hi) : DEFAULT_NU.nominal());
            if (!(lo > -1 && lo <= hi && hi < 0.5)) {
                throw fail("priors.nu", "expected -1 < min <= max < 0.5, got min " + lo + ", max " + hi);
            }
            if (!(nom >= lo && nom <= hi)) {
                throw fail("priors.nu.nominal", "expected a value in [" + lo + ", " + hi + "], got " + nom);
            }
            return new NuPrior(lo, hi, nom);
        }

        private UncertaintyOptions uncertainty(UncertaintyOptions u) {
            int s = u == null || u.samples() == null ? UncertaintyOptions.DEFAULT_SAMPLES : u.samples();
            if (s < 0 || s > MAX_SAMPLES) {
                throw fail("uncertainty.samples", "expected 0 (no uncertainty) to " + MAX_SAMPLES + ", got " + s);
            }
            String d = u == null || u.design() == null ? "sobol" : u.design().trim().toLowerCase(Locale.ROOT);
            if (!d.equals("sobol") && !d.equals("latin-hypercube")) {
                throw fail("uncertainty.design", "expected \"sobol\" or \"latin-hypercube\", got \"" + u.design() + "\"");
            }
            long seed = u == null || u.seed() == null ? 1L : u.seed();
            return new UncertaintyOptions(s, d, seed);
        }

        private Truth truth(Truth t) {
            if (t == null) {
                return null;
            }
            String disp = existingFile("truth.displacement", t.displacement(), false);
            String cent = existingFile("truth.lesion_centroids", t.lesionCentroids(), false);
            String land = existingFile("truth.landmarks", t.landmarks(), false);
            List<TruthLesion> ls = null;
            if (t.lesions() != null) {
                ls = new ArrayList<>();
                for (int n = 0; n < t.lesions().size(); n++) {
                    TruthLesion l = t.lesions().get(n);
                    String k = "truth.lesions[" + n + "]";
                    if (l == null || l.id() == null) {
                        throw fail(k + ".id", "required key missing");
                    }
                    ls.add(new TruthLesion(l.id(),
                            l.proneRasMm() == null ? null : point(k + ".prone_ras_mm", l.proneRasMm()),
                            l.supineRasMm() == null ? null : point(k + ".supine_ras_mm", l.supineRasMm())));
                }
                ls = List.copyOf(ls);
            }
            return new Truth(disp, cent, land, ls, t.notes());
        }

        private static double orDefault(Double v, double def) {
            return v == null ? def : v;
        }
    }
}
