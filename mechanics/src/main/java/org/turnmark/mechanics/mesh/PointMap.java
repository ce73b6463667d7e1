package org.turnmark.mechanics.mesh;

import java.util.Optional;

/**
 * A map between two configurations of the tissue, defined only inside the tissue: a point outside
 * has no image and is reported as such (never as NaN). Implementations are immutable and thread
 * safe; per-thread scratch lives in an {@link Evaluator}.
 */
public interface PointMap {

    /** A thread-confined evaluator (reusable scratch, no allocation per point). */
    interface Evaluator {
        /**
         * Maps world point (x, y, z) mm.
         *
         * @param out receives the image point (length ≥ 3), written only when the method returns true
         * @return false if the point lies outside the tissue in the source configuration
         */
        boolean map(double x, double y, double z, double[] out);
    }

    /** A new evaluator for use by one thread. */
    Evaluator evaluator();

    /** The image of one point, or empty if it lies outside the tissue. Allocates; for occasional use. */
    default Optional<double[]> map(double x, double y, double z) {
        double[] out = new double[3];
        return evaluator().map(x, y, z, out) ? Optional.of(out) : Optional.empty();
    }

    /**
     * The composition "this, then {@code next}" (for example prone → reference, then reference →
     * supine). A point is outside if it is outside for either map.
     */
    default PointMap andThen(PointMap next) {
        PointMap first = this;
        return () -> {
            Evaluator a = first.evaluator();
            Evaluator b = next.evaluator();
            double[] mid = new double[3];
            return (x, y, z, out) -> a.map(x, y, z, mid) && b.map(mid[0], mid[1], mid[2], out);
        };
    }
}
