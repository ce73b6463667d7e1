package org.turnmark.app.pipeline;

import java.util.List;
import java.util.Map;

import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.app.uncertainty.Sensitivity;

/**
 * Everything a plan reports, in plain values (the content of {@code plan.json}); the large arrays
 * (fields, warped images, mesh) travel separately in {@link PlanArtifacts}. Coordinates are world
 * RAS mm; every field name carries its unit.
 *
 * @param caution         the research-use-only caution
 * @param software        name and version of the program and the Java runtime
 * @param createdUtc      ISO-8601 time the plan finished
 * @param input           the case as used (normalised, defaults filled in)
 * @param inputSha256     SHA-256 of every input file, by case key
 * @param stageSeconds    wall time per named stage (s), in run order
 * @param model           finite-element model summary
 * @param uncertainty     how the uncertainty was obtained
 * @param rigidAlignment  the rigid map between the prone and supine image frames; null without a supine image
 * @param lesions         per-lesion results
 * @param flags           quality flags in plain words
 * @param warnings        other warnings (inputs, segmentation, nipples)
 */
public record PlanResult(String caution, Map<String, String> software, String createdUtc, CaseFile input,
                         Map<String, String> inputSha256, Map<String, Double> stageSeconds, ModelSummary model,
                         UncertaintySummary uncertainty, RigidAlignment rigidAlignment, List<LesionResult> lesions,
                         List<QualityFlag> flags, List<String> warnings) {

    /** A plan without a rigid alignment (no supine image). */
    public PlanResult(String caution, Map<String, String> software, String createdUtc, CaseFile input,
                      Map<String, String> inputSha256, Map<String, Double> stageSeconds, ModelSummary model,
                      UncertaintySummary uncertainty, List<LesionResult> lesions, List<QualityFlag> flags,
                      List<String> warnings) {
        this(caution, software, createdUtc, input, inputSha256, stageSeconds, model, uncertainty, null, lesions, flags,
                warnings);
    }

    /**
     * The rigid alignment T⁻¹ that carries the prone image frame (chest wall held in place) into the supine
     * image frame: the mechanics-only prediction in the supine frame is T⁻¹ of the prone-frame one, and the
     * hybrid registration starts from it (the registration-only baseline finds its own rigid start).
     *
     * @param method           how it was found, in words
     * @param proneToSupineRas 4×4 affine, row-major, world RAS mm → world RAS mm
     * @param rotationDeg      its rotation angle (degrees)
     * @param translationMm    its translation column (mm): where the prone-frame origin lands
     */
    public record RigidAlignment(String method, double[] proneToSupineRas, double rotationDeg, double[] translationMm) {
    }

    /** Method names used throughout the outputs. */
    public static final String MECHANICS = "mechanics-only";
    public static final String HYBRID = "hybrid";
    public static final String REGISTRATION = "registration-only";
    public static final String MARKED = "marked";

    /** Frame names: the prone image frame with the chest wall held in place, or the supine image frame. */
    public static final String FRAME_PRONE = "prone image (chest wall held in place)";
    public static final String FRAME_SUPINE = "supine image";

    /**
     * The finite-element model.
     *
     * @param elementSizeMm  element edge (mm)
     * @param elements       hexahedra
     * @param nodes          nodes
     * @param chestWallNodes nodes on the chest-wall boundary
     * @param fieldOfViewNodes nodes held in place where the image's field of view cuts the tissue
     * @param chestWall      "sliding" or "fixed" (nominal)
     * @param materials      nominal material per tissue: μ (kPa), ν, density (kg/m³)
     * @param solves         diagnostics of the nominal solves, by name
     */
    public record ModelSummary(double elementSizeMm, int elements, int nodes, int chestWallNodes, int fieldOfViewNodes,
                               String chestWall,
                               Map<String, Map<String, Double>> materials, Map<String, SolveSummary> solves) {
    }

    /**
     * Diagnostics of one finite-element solve.
     *
     * @param converged        whether it reached the tolerance
     * @param loadSteps        accepted load steps (or fixed-point iterations for the reference state)
     * @param newtonIterations Newton iterations in total
     * @param minDetF          smallest deformation-gradient determinant over the quadrature points
     * @param residual         final relative residual (force, or mm for the reference state)
     * @param maxDisplacementMm largest nodal displacement (mm)
     * @param seconds          wall time (s)
     */
    public record SolveSummary(boolean converged, int loadSteps, int newtonIterations, double minDetF,
                               double residual, double maxDisplacementMm, double seconds) {
    }

    /**
     * How the uncertainty was obtained.
     *
     * @param samples        requested samples
     * @param completed      samples whose solves converged
     * @param design         "sobol" or "latin-hypercube"
     * @param seed           the seed
     * @param parameters     the sampled parameters (keys)
     * @param addedAnalytically errors added to the covariance in closed form (lesion marking, registration)
     */
    public record UncertaintySummary(int samples, int completed, String design, long seed, List<String> parameters,
                                     List<String> addedAnalytically) {
    }

    /**
     * One lesion.
     *
     * @param id                   lesion id
     * @param side                 "left" or "right"
     * @param markedProneRasMm     the mark as given (converted from voxels if needed)
     * @param proneRasMm           the centroid used (refined on the image or labels when asked)
     * @param refinement           how the centroid was refined, in words
     * @param proneDescriptors     descriptors in the prone posture
     * @param predictions          one per method and frame
     * @param supineMarkToProne    the optional supine mark mapped back to prone, per method
     */
    public record LesionResult(String id, String side, double[] markedProneRasMm, double[] proneRasMm,
                               String refinement, Descriptors.Descriptor proneDescriptors, List<Prediction> predictions,
                               List<InverseMapping> supineMarkToProne) {
    }

    /**
     * A predicted supine position.
     *
     * @param method          {@link #MECHANICS}, {@link #HYBRID} or {@link #REGISTRATION}
     * @param frame           {@link #FRAME_PRONE} or {@link #FRAME_SUPINE}
     * @param positionRasMm   predicted centroid (nominal parameters)
     * @param displacementMm  position minus the prone centroid (mm)
     * @param covarianceMm2   3×3 row-major covariance (mm²); null without uncertainty
     * @param ellipsoid68     68.27 % ellipsoid; null without uncertainty
     * @param ellipsoid95     95 % ellipsoid; null without uncertainty
     * @param descriptors     descriptors in the supine posture (nipple mapped by the same method)
     * @param sensitivity     per-parameter effects; null without uncertainty
     * @param errorVsTruthMm  distance to the true supine centroid when the case has truth; else null
     * @param covarianceTerms the terms {@code covarianceMm2} is the sum of (hybrid only); else null
     */
    public record Prediction(String method, String frame, double[] positionRasMm, double[] displacementMm,
                             double[] covarianceMm2, EllipsoidSummary ellipsoid68, EllipsoidSummary ellipsoid95,
                             Descriptors.Descriptor descriptors, Sensitivity.Ranking sensitivity, Double errorVsTruthMm,
                             CovarianceTerms covarianceTerms) {

        /** A prediction whose covariance is not a sum of recorded terms. */
        public Prediction(String method, String frame, double[] positionRasMm, double[] displacementMm,
                          double[] covarianceMm2, EllipsoidSummary ellipsoid68, EllipsoidSummary ellipsoid95,
                          Descriptors.Descriptor descriptors, Sensitivity.Ranking sensitivity, Double errorVsTruthMm) {
            this(method, frame, positionRasMm, displacementMm, covarianceMm2, ellipsoid68, ellipsoid95, descriptors,
                    sensitivity, errorVsTruthMm, null);
        }
    }

    /**
     * The terms of the hybrid covariance, all in the supine image frame (mm²):
     * Σ = markingWeight · marking + registrationSdMm² I + mechanicsWeight · mechanics.
     *
     * @param markingMm2        lesion-marking error propagated through the mechanics map (J Σ Jᵀ), rotated
     *                          into the supine frame, 3×3 row-major (mm²)
     * @param markingWeight     1 when the centroid is the mark or its intensity-weighted refinement, 0 when
     *                          it was refined on a lesion label
     * @param registrationSdMm  isotropic SD of the registration's own error (mm)
     * @param mechanicsMm2      the mechanics-only covariance in the supine frame (R Σ_m Rᵀ + s_m² I),
     *                          3×3 row-major (mm²)
     * @param mechanicsWeight   the share of it the hybrid keeps (dimensionless)
     */
    public record CovarianceTerms(double[] markingMm2, double markingWeight, double registrationSdMm,
                                  double[] mechanicsMm2, double mechanicsWeight) {
    }

    /**
     * An ellipsoid in plain numbers.
     *
     * @param probability probability content
     * @param chiSquare   χ²₃(p)
     * @param semiAxesMm  semi-axis lengths, longest first (mm)
     * @param axes        unit directions (RAS), one row per semi-axis
     */
    public record EllipsoidSummary(double probability, double chiSquare, double[] semiAxesMm, double[][] axes) {

        /** Summarises an ellipsoid. */
        public static EllipsoidSummary of(Ellipsoid e) {
            return new EllipsoidSummary(e.probability(), e.chiSquare(), e.semiAxesMm(),
                    new double[][] {e.axis(0), e.axis(1), e.axis(2)});
        }
    }

    /**
     * A supine point mapped back to prone.
     *
     * @param method          method used
     * @param supineRasMm     the supine mark
     * @param proneRasMm      its prone position
     */
    public record InverseMapping(String method, double[] supineRasMm, double[] proneRasMm) {
    }

    /**
     * A quality flag.
     *
     * @param severity "ok", "warning" or "problem"
     * @param check    what was checked, e.g. "finite-element convergence"
     * @param message  the finding in plain words, with numbers and units
     */
    public record QualityFlag(String severity, String check, String message) {
        public static final String OK = "ok";
        public static final String WARNING = "warning";
        public static final String PROBLEM = "problem";
    }
}
