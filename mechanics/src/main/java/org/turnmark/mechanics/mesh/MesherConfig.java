package org.turnmark.mechanics.mesh;

/**
 * Settings of {@link LabelMesher}, validated on construction.
 *
 * @param elementMm          edge length h of the hexahedra along each voxel axis (mm), &gt; 0
 * @param tissueFraction     an element is tissue when at least this fraction of its sub-samples
 *                           carry a tissue label (1, 2, 3 or 5); in (0, 1]
 * @param lesionFraction     an element is labelled lesion (5), and kept even below
 *                           {@code tissueFraction}, when at least this fraction of its sub-samples
 *                           are lesion, so that small lesions stay stiff; in (0, 1]
 * @param maxDroppedFraction disconnected tissue pieces are dropped (with a warning) only if together
 *                           they hold at most this fraction of the tissue elements; otherwise meshing
 *                           fails and reports the component sizes; in [0, 1)
 * @param maxElements        upper limit on tissue elements (memory guard); ≥ 1
 */
public record MesherConfig(double elementMm, double tissueFraction, double lesionFraction,
                           double maxDroppedFraction, long maxElements) {

    /** Default majority rule: half the sub-samples must be tissue. */
    public static final double DEFAULT_TISSUE_FRACTION = 0.5;
    /** Default lesion rule: a quarter of the sub-samples lesion makes a lesion element. */
    public static final double DEFAULT_LESION_FRACTION = 0.25;
    /** Default: stray pieces totalling at most 1 % of the tissue elements are dropped with a warning. */
    public static final double DEFAULT_MAX_DROPPED_FRACTION = 0.01;
    /** Default element limit, far above breast models at 3 mm (≈ 10⁵ elements). */
    public static final long DEFAULT_MAX_ELEMENTS = 2_000_000L;

    /** Validates every field; messages name the field, the expected range and the value. */
    public MesherConfig {
        if (!(elementMm > 0) || !Double.isFinite(elementMm)) {
            throw new IllegalArgumentException("element size must be a finite number > 0 mm, got " + elementMm);
        }
        if (!(tissueFraction > 0 && tissueFraction <= 1)) {
            throw new IllegalArgumentException("tissueFraction must be in (0, 1], got " + tissueFraction);
        }
        if (!(lesionFraction > 0 && lesionFraction <= 1)) {
            throw new IllegalArgumentException("lesionFraction must be in (0, 1], got " + lesionFraction);
        }
        if (!(maxDroppedFraction >= 0 && maxDroppedFraction < 1)) {
            throw new IllegalArgumentException("maxDroppedFraction must be in [0, 1), got " + maxDroppedFraction);
        }
        if (maxElements < 1) {
            throw new IllegalArgumentException("maxElements must be >= 1, got " + maxElements);
        }
    }

    /** Defaults with element size {@code elementMm}. */
    public static MesherConfig of(double elementMm) {
        return new MesherConfig(elementMm, DEFAULT_TISSUE_FRACTION, DEFAULT_LESION_FRACTION,
                DEFAULT_MAX_DROPPED_FRACTION, DEFAULT_MAX_ELEMENTS);
    }
}
