package org.turnmark.app.pipeline;

import java.util.List;

import com.fasterxml.jackson.annotation.JsonInclude;
import com.fasterxml.jackson.annotation.JsonProperty;
import com.fasterxml.jackson.annotation.JsonPropertyOrder;

/**
 * A planning case: the input of {@code turnmark plan}, read from a versioned JSON file (schema in
 * {@code docs/case-format.md}). Coordinates are world RAS+ millimetres; voxel indices are zero-based
 * (i, j, k) of the prone image.
 *
 * <p>{@link CaseFileReader#read} returns a normalised instance: paths absolute, every optional
 * block present with its defaults filled in, so that {@code plan.json} records exactly what was used.
 * Records hold arrays by reference; treat them as read-only.
 */
@JsonInclude(JsonInclude.Include.NON_NULL)
@JsonPropertyOrder({"schema_version", "case_id", "description", "prone_image", "supine_image", "labels",
    "laterality", "lesions", "nipples", "chest_wall_plane_ras_mm", "model", "priors", "uncertainty",
    "rigid_alignment", "output", "truth"})
public record CaseFile(
        @JsonProperty("schema_version") Integer schemaVersion,
        @JsonProperty("case_id") String caseId,
        @JsonProperty("description") String description,
        @JsonProperty("prone_image") String proneImage,
        @JsonProperty("supine_image") String supineImage,
        @JsonProperty("labels") String labels,
        @JsonProperty("laterality") String laterality,
        @JsonProperty("lesions") List<LesionMark> lesions,
        @JsonProperty("nipples") List<NippleMark> nipples,
        @JsonProperty("chest_wall_plane_ras_mm") List<double[]> chestWallPlaneRasMm,
        @JsonProperty("model") ModelOptions model,
        @JsonProperty("priors") Priors priors,
        @JsonProperty("uncertainty") UncertaintyOptions uncertainty,
        @JsonProperty("rigid_alignment") String rigidAlignment,
        @JsonProperty("output") String output,
        @JsonProperty("truth") Truth truth) {

    /** {@code rigid_alignment}: the whole image decides (the default). */
    public static final String ALIGN_WHOLE_IMAGE = "whole_image";
    /** {@code rigid_alignment}: the chest wall alone decides, when the image shows it across the chest. */
    public static final String ALIGN_CHEST_WALL = "chest_wall";

    /** The schema version this code reads and writes. */
    public static final int SCHEMA_VERSION = 1;

    /** True if a supine image was given (hybrid and registration-only predictions are possible). */
    public boolean hasSupine() {
        return supineImage != null;
    }

    /**
     * This case with {@code model.element_size_mm} replaced (other model options kept), e.g. a
     * coarser model for repeated runs.
     *
     * @param elementSizeMm element edge, mm, or null for the case's own value
     */
    public CaseFile withElementSizeMm(Double elementSizeMm) {
        if (elementSizeMm == null) {
            return this;
        }
        ModelOptions m2 = new ModelOptions(elementSizeMm, model == null ? null : model.chestWall(),
                model == null ? null : model.gravityMS2());
        return new CaseFile(schemaVersion, caseId, description, proneImage, supineImage, labels, laterality, lesions,
                nipples, chestWallPlaneRasMm, m2, priors, uncertainty, rigidAlignment, output, truth);
    }

    /**
     * A lesion mark on the prone image: exactly one of {@code position_ras_mm} or
     * {@code position_voxel}; {@code radius_mm} or {@code label} let the pipeline refine the
     * centroid on the image; {@code supine_position_ras_mm} is an optional point marked on the supine
     * image, mapped back to prone.
     */
    @JsonInclude(JsonInclude.Include.NON_NULL)
    @JsonPropertyOrder({"id", "side", "position_ras_mm", "position_voxel", "radius_mm", "label",
        "supine_position_ras_mm"})
    public record LesionMark(
            @JsonProperty("id") String id,
            @JsonProperty("side") String side,
            @JsonProperty("position_ras_mm") double[] positionRasMm,
            @JsonProperty("position_voxel") double[] positionVoxel,
            @JsonProperty("radius_mm") Double radiusMm,
            @JsonProperty("label") Integer label,
            @JsonProperty("supine_position_ras_mm") double[] supinePositionRasMm) {
    }

    /** A nipple position (world RAS mm) on the prone image; side "left" or "right". */
    @JsonPropertyOrder({"side", "position_ras_mm"})
    public record NippleMark(
            @JsonProperty("side") String side,
            @JsonProperty("position_ras_mm") double[] positionRasMm) {
    }

    /** Finite-element model options. */
    @JsonInclude(JsonInclude.Include.NON_NULL)
    @JsonPropertyOrder({"element_size_mm", "chest_wall", "gravity_m_s2"})
    public record ModelOptions(
            @JsonProperty("element_size_mm") Double elementSizeMm,
            @JsonProperty("chest_wall") String chestWall,
            @JsonProperty("gravity_m_s2") Double gravityMS2) {

        /** Default element edge (mm): coarse enough for a plan in minutes on two cores. */
        public static final double DEFAULT_ELEMENT_SIZE_MM = 6.0;
        /** Standard gravity (m/s², CGPM 1901). */
        public static final double DEFAULT_GRAVITY_M_S2 = 9.80665;
    }

    /**
     * The priors the uncertainty is propagated from. Stiffness per tissue is log-normal (median and
     * geometric standard deviation of the shear modulus μ); Poisson's ratio is uniform on
     * [nu_min, nu_max]; the chest wall slides with the given probability (else it is fixed); the
     * gravity direction deviates from the nominal posture by an isotropic angle with the given
     * standard deviation; the lesion mark and the registration have isotropic Gaussian errors; the
     * mechanics-only prediction carried into the supine image frame has an isotropic Gaussian error for
     * the rigid alignment and the model error the other priors do not span; in the prone image frame, the
     * sampled covariance is scaled by a factor and gets an isotropic term of its own for the model error.
     */
    @JsonInclude(JsonInclude.Include.NON_NULL)
    @JsonPropertyOrder({"fat", "fibroglandular", "skin", "lesion", "nu", "chest_wall_sliding_probability",
        "gravity_direction_sd_deg", "lesion_marking_sd_mm", "registration_sd_mm", "mechanics_supine_sd_mm",
        "mechanics_prone_sd_mm", "mechanics_prone_scale", "mechanics_prone_scale_wide_field"})
    public record Priors(
            @JsonProperty("fat") TissuePrior fat,
            @JsonProperty("fibroglandular") TissuePrior fibroglandular,
            @JsonProperty("skin") TissuePrior skin,
            @JsonProperty("lesion") TissuePrior lesion,
            @JsonProperty("nu") NuPrior nu,
            @JsonProperty("chest_wall_sliding_probability") Double chestWallSlidingProbability,
            @JsonProperty("gravity_direction_sd_deg") Double gravityDirectionSdDeg,
            @JsonProperty("lesion_marking_sd_mm") Double lesionMarkingSdMm,
            @JsonProperty("registration_sd_mm") Double registrationSdMm,
            @JsonProperty("mechanics_supine_sd_mm") Double mechanicsSupineSdMm,
            @JsonProperty("mechanics_prone_sd_mm") Double mechanicsProneSdMm,
            @JsonProperty("mechanics_prone_scale") Double mechanicsProneScale,
            @JsonProperty("mechanics_prone_scale_wide_field") Double mechanicsProneScaleWideField) {
    }

    /** Log-normal prior on a tissue's shear modulus, and its density. */
    @JsonPropertyOrder({"mu_kpa_median", "mu_geometric_sd", "density_kg_m3"})
    public record TissuePrior(
            @JsonProperty("mu_kpa_median") Double muKpaMedian,
            @JsonProperty("mu_geometric_sd") Double muGeometricSd,
            @JsonProperty("density_kg_m3") Double densityKgM3) {
    }

    /** Uniform prior on Poisson's ratio with the value used for the nominal prediction. */
    @JsonPropertyOrder({"min", "max", "nominal"})
    public record NuPrior(
            @JsonProperty("min") Double min,
            @JsonProperty("max") Double max,
            @JsonProperty("nominal") Double nominal) {
    }

    /** Sampling options for the uncertainty. */
    @JsonPropertyOrder({"samples", "design", "seed"})
    public record UncertaintyOptions(
            @JsonProperty("samples") Integer samples,
            @JsonProperty("design") String design,
            @JsonProperty("seed") Long seed) {

        /** Default sample count: enough for a 3×3 covariance, few enough for minutes of run time. */
        public static final int DEFAULT_SAMPLES = 12;
    }

    /**
     * Known truth for synthetic cases (used by tests and the calibration benchmark, never by the
     * prediction itself): files written by the phantom generator and/or lesion centroids inline.
     */
    @JsonInclude(JsonInclude.Include.NON_NULL)
    @JsonPropertyOrder({"displacement", "lesion_centroids", "landmarks", "lesions", "notes"})
    public record Truth(
            @JsonProperty("displacement") String displacement,
            @JsonProperty("lesion_centroids") String lesionCentroids,
            @JsonProperty("landmarks") String landmarks,
            @JsonProperty("lesions") List<TruthLesion> lesions,
            @JsonProperty("notes") String notes) {
    }

    /** A true lesion centroid in both postures (world RAS mm). */
    @JsonPropertyOrder({"id", "prone_ras_mm", "supine_ras_mm"})
    public record TruthLesion(
            @JsonProperty("id") String id,
            @JsonProperty("prone_ras_mm") double[] proneRasMm,
            @JsonProperty("supine_ras_mm") double[] supineRasMm) {
    }
}
