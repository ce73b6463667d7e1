package org.turnmark.app.pipeline;

import org.turnmark.app.uncertainty.PriorDesign;

/**
 * The planner's default priors: what a plan uses when the case file has no {@code priors} block
 * ({@link CaseFileReader}'s defaults, documented in {@code docs/case-format.md}), as the
 * {@link PriorDesign.Spec} the planner builds from them and the tissue densities it uses. The phantom
 * generator draws its truth from these when asked to ({@code turnmark phantom --truth priors}), so
 * that the calibration of the ellipsoids compares like with like. Stateless.
 */
public final class DefaultPriors {

    private DefaultPriors() {
    }

    /** The priors block the case reader fills in when a case gives none. */
    public static CaseFile.Priors priors() {
        return new CaseFile.Priors(CaseFileReader.DEFAULT_FAT, CaseFileReader.DEFAULT_FIBROGLANDULAR,
                CaseFileReader.DEFAULT_SKIN, CaseFileReader.DEFAULT_LESION, CaseFileReader.DEFAULT_NU,
                CaseFileReader.DEFAULT_SLIDING_PROBABILITY, CaseFileReader.DEFAULT_GRAVITY_SD_DEG,
                CaseFileReader.DEFAULT_LESION_MARKING_SD_MM, CaseFileReader.DEFAULT_REGISTRATION_SD_MM,
                CaseFileReader.DEFAULT_MECHANICS_SUPINE_SD_MM, CaseFileReader.DEFAULT_MECHANICS_PRONE_SD_MM,
                CaseFileReader.DEFAULT_MECHANICS_PRONE_SCALE, CaseFileReader.DEFAULT_MECHANICS_PRONE_SCALE_WIDE_FIELD);
    }

    /** The sampling spec the planner builds from the default priors (same code path as a plan). */
    public static PriorDesign.Spec spec() {
        return Planner.spec(priors());
    }

    /** Densities of fat, fibroglandular tissue, skin and lesion (kg/m³) the planner uses by default. */
    public static double[] densitiesKgM3() {
        return Planner.densities(priors());
    }

    /** The planner's default magnitude of gravity (m/s²). */
    public static double gravityMs2() {
        return CaseFile.ModelOptions.DEFAULT_GRAVITY_M_S2;
    }
}
