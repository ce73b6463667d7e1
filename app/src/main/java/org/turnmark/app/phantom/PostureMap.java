package org.turnmark.app.phantom;

/**
 * Maps a point of a posture image back to the reference (gravity-free) anatomy. Implementations are
 * thread safe.
 */
public interface PostureMap {

    /** The reference posture itself: every point is its own preimage. */
    PostureMap IDENTITY = (x, y, z, out) -> {
        out[0] = x;
        out[1] = y;
        out[2] = z;
        return true;
    };

    /**
     * Finds the reference point that lands on image point (x, y, z) (RAS mm).
     *
     * @param out receives the reference point (length ≥ 3) when the result is true
     * @return false if no material point lands there (air)
     */
    boolean preimage(double x, double y, double z, double[] out);
}
