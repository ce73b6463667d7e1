package org.turnmark.geom;

/**
 * The research-use-only caution carried by every output (NIfTI {@code descrip}, CSV comment line,
 * JSON field, report footer, command-line output, GUI banner). One source so the wording never
 * drifts between outputs.
 */
public final class ResearchUse {

    /** Fits in the 80-byte NIfTI {@code descrip} field (ASCII, ≤ 79 characters). */
    public static final String DESCRIP = "Turnmark RESEARCH USE ONLY - not for diagnosis or treatment";

    /** One line for help texts, CSV comment lines and console output. */
    public static final String SHORT = "RESEARCH USE ONLY: not a medical device; model estimates, not for "
            + "diagnosis or treatment decisions. Confirm every location on standard-of-care imaging.";

    /** The full caution for reports, JSON outputs and the GUI. */
    public static final String FULL = "RESEARCH USE ONLY. Turnmark is research software, not a medical device, "
            + "and is not for diagnosis or treatment decisions. Its positions are model estimates with stated "
            + "uncertainty and have not been validated for individual patients. Any location must be confirmed "
            + "by qualified clinicians on standard-of-care imaging; clinical judgement, local practice and local "
            + "regulations prevail. Provided without warranty.";

    private ResearchUse() {
    }
}
