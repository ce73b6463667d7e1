package org.turnmark.app.pipeline;

import java.util.Locale;

/**
 * Location descriptors of a lesion in one posture, as used in breast-imaging reports (common
 * practice; REFERENCE §3, secondary teaching sources): side, clock-face position, quadrant, distance
 * from the nipple, depth third along the nipple–chest-wall line, and depth below the skin and above
 * the chest wall.
 *
 * <p>Clock face: as seen by an observer facing the patient, 12 o'clock superior, 6 inferior. The
 * observer's right is the patient's left, so with the lesion offset from the nipple projected on the
 * coronal plane, {@code (dx, dz)} in RAS, the clock angle measured clockwise from 12 is
 * {@code atan2(−dx, dz)}. The same formula puts lateral at 9 o'clock in the right breast (dx > 0)
 * and at 3 o'clock in the left (dx < 0). Positions are rounded to the nearest half hour.
 *
 * <p>Quadrant: upper/lower by the sign of dz; outer (lateral) when the offset points away from the
 * midline for that breast, with {@code lateral} the offset component away from the midline
 * ({@code dx} in the right breast, {@code −dx} in the left). Within {@link #CENTRAL_RADIUS_MM} of the
 * nipple (coronal projection) the lesion is central/retroareolar. It is in the axillary tail when it
 * is upper-outer ({@code dz ≥ 0}, {@code lateral ≥ 0}), more than {@link #AXILLARY_TAIL_MIN_MM} from
 * the nipple in coronal projection, and {@code dz > lateral / 2}: more than atan(1/2) ≈ 26.6° above the
 * lateral direction, up to and including straight superior. That is the upper-outer sector from about
 * 9:53 to 12:00 in the right breast and from 12:00 to about 2:07 in the left (exact angle, before the
 * clock's half-hour rounding); it is not centred on the superolateral diagonal. A stated heuristic:
 * the tail extends from the upper-outer quadrant toward the axilla.
 *
 * <p>Stateless; thread safe. All inputs in world RAS mm.
 */
public final class Descriptors {

    /** Coronal distance from the nipple below which a lesion is central/retroareolar: about an areola radius (common practice). */
    public static final double CENTRAL_RADIUS_MM = 20.0;
    /** Coronal distance from the nipple beyond which an upper-outer lesion with dz &gt; lateral/2 is in the axillary tail (heuristic). */
    public static final double AXILLARY_TAIL_MIN_MM = 70.0;

    /**
     * The descriptors of one lesion in one posture.
     *
     * @param side                  "left" or "right"
     * @param clockHour             clock position in hours, 0.5 steps, in (0, 12]
     * @param clock                 the clock position as text, e.g. "10:30"
     * @param quadrant              "upper-outer", "upper-inner", "lower-outer", "lower-inner",
     *                              "central/retroareolar" or "axillary tail"
     * @param distanceFromNippleCm  straight-line (3-D) distance from the nipple, cm
     * @param depthFraction         position along nipple → chest wall, 0 at the nipple, 1 at the chest
     *                              wall (clamped)
     * @param depthThird            "anterior", "middle" or "posterior"
     * @param depthFromSkinMm       shortest distance to the skin surface, mm
     * @param depthFromChestWallMm  shortest distance to the chest-wall surface, mm; null (unknown, not
     *                              zero) when the model has no chest-wall surface
     */
    public record Descriptor(String side, double clockHour, String clock, String quadrant,
                             double distanceFromNippleCm, double depthFraction, String depthThird,
                             double depthFromSkinMm, Double depthFromChestWallMm) {

        /** The report-order summary, e.g. "left breast, 2:00, upper-outer, middle third, 4.5 cm from the nipple". */
        public String summary() {
            return String.format(Locale.ROOT, "%s breast, %s o'clock, %s, %s third, %.1f cm from the nipple",
                    side, clock, quadrant, depthThird, distanceFromNippleCm);
        }
    }

    private Descriptors() {
    }

    /**
     * Computes the descriptors.
     *
     * @param side                 "left" or "right"
     * @param lesionRasMm          lesion centroid
     * @param nippleRasMm          nipple in the same posture
     * @param chestWallRasMm       the chest-wall point behind the nipple (for the depth third): the
     *                             nearest chest-wall surface point to the nipple
     * @param depthFromSkinMm      shortest distance from the lesion to the skin surface (≥ 0)
     * @param depthFromChestWallMm shortest distance from the lesion to the chest wall (≥ 0); null when
     *                             there is no chest-wall surface (kept null in the result)
     */
    public static Descriptor compute(String side, double[] lesionRasMm, double[] nippleRasMm, double[] chestWallRasMm,
                                     double depthFromSkinMm, Double depthFromChestWallMm) {
        boolean right;
        if ("right".equals(side)) {
            right = true;
        } else if ("left".equals(side)) {
            right = false;
        } else {
            throw new IllegalArgumentException("side must be \"left\" or \"right\", got \"" + side + "\"");
        }
        double dx = lesionRasMm[0] - nippleRasMm[0];
        double dy = lesionRasMm[1] - nippleRasMm[1];
        double dz = lesionRasMm[2] - nippleRasMm[2];
        double coronal = Math.hypot(dx, dz);
        // Clockwise from 12 as the observer facing the patient sees it: observer's right = −x.
        double deg = Math.toDegrees(Math.atan2(-dx, dz));
        if (deg < 0) {
            deg += 360;
        }
        double hour = Math.round(deg / 30.0 * 2.0) / 2.0;
        if (hour <= 0) {
            hour += 12;
        }
        int h = (int) Math.floor(hour);
        String clock = String.format(Locale.ROOT, "%d:%s", h == 0 ? 12 : h, hour - h > 0 ? "30" : "00");

        boolean upper = dz >= 0;
        // Lateral = away from the midline: +x for the right breast, −x for the left.
        double lateral = right ? dx : -dx;
        boolean outer = lateral >= 0;
        String quadrant;
        if (coronal < CENTRAL_RADIUS_MM) {
            quadrant = "central/retroareolar";
        } else if (upper && outer && coronal > AXILLARY_TAIL_MIN_MM && dz > 0.5 * lateral) {
            // Upper-outer beyond the radius and more than atan(1/2) ≈ 26.6° above lateral (see class doc).
            quadrant = "axillary tail";
        } else {
            quadrant = (upper ? "upper" : "lower") + "-" + (outer ? "outer" : "inner");
        }

        double dist = Math.sqrt(dx * dx + dy * dy + dz * dz);
        double cx = chestWallRasMm[0] - nippleRasMm[0];
        double cy = chestWallRasMm[1] - nippleRasMm[1];
        double cz = chestWallRasMm[2] - nippleRasMm[2];
        double len2 = cx * cx + cy * cy + cz * cz;
        if (!(len2 > 0)) {
            throw new IllegalArgumentException("nipple and chest-wall point coincide; depth third undefined");
        }
        double f = (dx * cx + dy * cy + dz * cz) / len2;
        f = Math.max(0, Math.min(1, f));
        String third = f < 1.0 / 3.0 ? "anterior" : f < 2.0 / 3.0 ? "middle" : "posterior";
        return new Descriptor(side, hour, clock, quadrant, dist / 10.0, f, third,
                Math.max(0, depthFromSkinMm),
                depthFromChestWallMm == null ? null : Double.valueOf(Math.max(0, depthFromChestWallMm)));
    }
}
