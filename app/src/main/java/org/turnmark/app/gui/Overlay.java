package org.turnmark.app.gui;

/**
 * Something drawn over the slices: a point (lesion mark, nipple, predicted position) with an optional
 * 95 % uncertainty ellipsoid. World RAS mm. Immutable apart from the arrays, which are treated as
 * read-only.
 *
 * @param label       short text shown beside the point, e.g. "L1 hybrid"
 * @param kind        what it is (decides colour and legend)
 * @param posture     the image frame the point belongs to; only overlays of the displayed image's
 *                    posture are drawn
 * @param centerRasMm position (RAS mm), length 3
 * @param ellipsoid   the uncertainty ellipsoid, or null
 */
public record Overlay(String label, Kind kind, Posture posture, double[] centerRasMm, Ellipsoid ellipsoid) {

    /** What an overlay shows. */
    public enum Kind {
        /** The lesion as marked on the prone image (editable). */
        LESION_MARK("lesion mark"),
        /** A nipple position. */
        NIPPLE("nipple"),
        /** Predicted by the finite-element model alone. */
        MECHANICS("mechanics-only"),
        /** Mechanics refined by intensity registration. */
        HYBRID("hybrid"),
        /** Intensity registration from a rigid start, a baseline. */
        REGISTRATION("registration-only"),
        /** Known truth of a synthetic case. */
        TRUTH("truth (synthetic)");

        private final String text;

        Kind(String text) {
            this.text = text;
        }

        /** Plain-words name for legends and tables. */
        public String text() {
            return text;
        }
    }

    /** The posture (and so image frame) a position belongs to. */
    public enum Posture {
        PRONE, SUPINE
    }

    /**
     * An ellipsoid given by its axes.
     *
     * @param axes        unit directions {@code axes[i]} (RAS), length 3 each
     * @param semiAxesMm  semi-axis lengths (mm) along each direction
     * @param probability probability content, e.g. 0.95
     */
    public record Ellipsoid(double[][] axes, double[] semiAxesMm, double probability) {
    }
}
