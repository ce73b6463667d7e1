package org.turnmark.app.phantom;

import java.util.Locale;

/**
 * Validated settings of one synthetic case. Lengths in mm, volumes in ml (cm³), angles in degrees.
 *
 * @param seed              seed of every random choice (anatomy, truth conditions, bias, noise)
 * @param spacingMm         isotropic voxel spacing of the images, in [1, 5] mm
 * @param breasts           1 or 2 breasts
 * @param side              side of a single breast: "right" or "left" (ignored for two breasts)
 * @param breastVolumeMl    volume of each breast mound anterior of the chest wall, in [100, 1500] ml
 * @param projection        protrusion of the mound relative to its half-width, in [0.5, 1.3]
 * @param ptosis            droop of the mound towards inferior, in [0, 1] (0 = none)
 * @param lesionDiameterMm  volume-equivalent lesion diameter, in [5, 30] mm
 * @param lesionCount       lesions per case, in [1, 4]
 * @param contrast          MR-like contrast of the rendered images
 * @param snr               signal-to-noise ratio (mean breast-tissue signal / noise σ), in [3, 1000]
 * @param elementMm         hexahedral element size of the truth finite-element model, in [2, 10] mm
 * @param truth             how the truth conditions are chosen ({@link Truth#DEFAULT}: deliberately
 *                          different from the planner's defaults; {@link Truth#PRIORS}: one draw from
 *                          the planner's default priors)
 * @param fieldOfView       what the images cover ({@link FieldOfView#BREAST}: the breasts with a margin of
 *                          torso; {@link FieldOfView#CHEST}: the whole anterior half of the torso, with its
 *                          ribs and sternum)
 */
public record PhantomOptions(long seed, double spacingMm, int breasts, String side, double breastVolumeMl,
                             double projection, double ptosis, double lesionDiameterMm, int lesionCount,
                             Contrast contrast, double snr, double elementMm, Truth truth,
                             FieldOfView fieldOfView) {

    /** What the images cover. */
    public enum FieldOfView {
        /**
         * The breasts with a margin of torso (a few centimetres of chest wall behind them, 15–30 mm each
         * side); the torso is featureless there. The bundled sample cases use this.
         */
        BREAST,
        /**
         * Both sides of the chest and the anterior half of the torso (down to the torso's centre line),
         * with a sternum, ribs at an irregular pitch, lungs and a heart drawn inside the chest wall, so that the
         * torso alone fixes its own placement in the image.
         */
        CHEST;

        /** Parses "breast" or "chest" (any case). */
        public static FieldOfView parse(String s) {
            return parseKey(FieldOfView.class, s, "field of view");
        }

        /** The lower-case name used on the command line and in the truth files. */
        public String key() {
            return name().toLowerCase(Locale.ROOT);
        }
    }

    /** How the truth conditions (materials, chest wall, supine gravity) of a case are chosen. */
    public enum Truth {
        /**
         * Conditions that differ on purpose from the planner's defaults (per-tissue stiffness about
         * the mechanics defaults, ν 0.47, scaled densities, sliding chest wall, gravity turned with the
         * torso rotation); the bundled sample cases use this.
         */
        DEFAULT,
        /**
         * One random draw from the planner's default prior distribution (stiffness, ν, chest-wall
         * condition, supine gravity roll and pitch), for calibrating the planner's ellipsoids.
         */
        PRIORS;

        /** Parses "default" or "priors" (any case). */
        public static Truth parse(String s) {
            return parseKey(Truth.class, s, "truth");
        }

        /** The lower-case name used on the command line and in the truth files. */
        public String key() {
            return name().toLowerCase(Locale.ROOT);
        }
    }

    /** MR-like contrast. */
    public enum Contrast {
        /** T1-weighted-like: fat bright, fibroglandular tissue darker, lesion about as dark as gland. */
        T1,
        /** Fat-suppressed, contrast-enhanced: fat dark, lesion bright. */
        FATSAT;

        /** Parses "t1" or "fatsat" (any case). */
        public static Contrast parse(String s) {
            return parseKey(Contrast.class, s, "contrast");
        }
    }

    /** Validates every field; messages name the field, the expected range and the value. */
    public PhantomOptions {
        range("spacing_mm", spacingMm, 1, 5);
        if (breasts != 1 && breasts != 2) {
            throw new IllegalArgumentException("breasts must be 1 or 2, got " + breasts);
        }
        if (!"right".equals(side) && !"left".equals(side)) {
            throw new IllegalArgumentException("side must be right or left, got '" + side + "'");
        }
        range("breast_volume_ml", breastVolumeMl, 100, 1500);
        range("projection", projection, 0.5, 1.3);
        range("ptosis", ptosis, 0, 1);
        range("lesion_mm", lesionDiameterMm, 5, 30);
        if (lesionCount < 1 || lesionCount > 4) {
            throw new IllegalArgumentException("lesions must be in [1, 4], got " + lesionCount);
        }
        if (contrast == null) {
            throw new IllegalArgumentException("contrast must be given (t1 or fatsat)");
        }
        range("snr", snr, 3, 1000);
        range("element_mm", elementMm, 2, 10);
        if (truth == null) {
            throw new IllegalArgumentException("truth must be given (default or priors)");
        }
        if (fieldOfView == null) {
            throw new IllegalArgumentException("field of view must be given (breast or chest)");
        }
    }

    /** Options with the breast field of view ({@link FieldOfView#BREAST}). */
    public PhantomOptions(long seed, double spacingMm, int breasts, String side, double breastVolumeMl,
                          double projection, double ptosis, double lesionDiameterMm, int lesionCount,
                          Contrast contrast, double snr, double elementMm, Truth truth) {
        this(seed, spacingMm, breasts, side, breastVolumeMl, projection, ptosis, lesionDiameterMm, lesionCount,
                contrast, snr, elementMm, truth, FieldOfView.BREAST);
    }

    /** Options with the default truth conditions ({@link Truth#DEFAULT}). */
    public PhantomOptions(long seed, double spacingMm, int breasts, String side, double breastVolumeMl,
                          double projection, double ptosis, double lesionDiameterMm, int lesionCount,
                          Contrast contrast, double snr, double elementMm) {
        this(seed, spacingMm, breasts, side, breastVolumeMl, projection, ptosis, lesionDiameterMm, lesionCount,
                contrast, snr, elementMm, Truth.DEFAULT);
    }

    /** These options with another way of choosing the truth conditions. */
    public PhantomOptions withTruth(Truth t) {
        return new PhantomOptions(seed, spacingMm, breasts, side, breastVolumeMl, projection, ptosis,
                lesionDiameterMm, lesionCount, contrast, snr, elementMm, t, fieldOfView);
    }

    /** These options with another field of view. */
    public PhantomOptions withFieldOfView(FieldOfView f) {
        return new PhantomOptions(seed, spacingMm, breasts, side, breastVolumeMl, projection, ptosis,
                lesionDiameterMm, lesionCount, contrast, snr, elementMm, truth, f);
    }

    /** Defaults: 2 mm voxels, one right breast of 350 ml, one 12 mm lesion, T1 contrast, SNR 25, 5 mm elements. */
    public static PhantomOptions defaults(long seed) {
        return new PhantomOptions(seed, 2.0, 1, "right", 350, 0.85, 0.3, 12, 1, Contrast.T1, 25, 5.0);
    }

    /**
     * The constant of {@code type} whose lower-case name is {@code s} (trimmed, any case); otherwise an error
     * "WHAT must be a or b, got 's'".
     */
    private static <E extends Enum<E>> E parseKey(Class<E> type, String s, String what) {
        E[] all = type.getEnumConstants();
        String v = s == null ? "" : s.trim().toLowerCase(Locale.ROOT);
        StringBuilder names = new StringBuilder();
        for (int i = 0; i < all.length; i++) {
            String key = all[i].name().toLowerCase(Locale.ROOT);
            if (key.equals(v)) {
                return all[i];
            }
            names.append(i == 0 ? "" : i == all.length - 1 ? " or " : ", ").append(key);
        }
        throw new IllegalArgumentException(what + " must be " + names + ", got '" + s + "'");
    }

    private static void range(String name, double v, double lo, double hi) {
        if (!(v >= lo && v <= hi)) {
            throw new IllegalArgumentException(name + " must be in [" + lo + ", " + hi + "], got " + v);
        }
    }
}
