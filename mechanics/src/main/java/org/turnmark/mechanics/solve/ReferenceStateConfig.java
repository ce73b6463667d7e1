package org.turnmark.mechanics.solve;

/**
 * Settings of {@link ReferenceStateSolver}.
 *
 * @param toleranceMm    stop when the nodes of the reloaded reference lie within this distance of
 *                       their loaded (observed) positions, mm, &gt; 0 (default 0.05 mm, well below
 *                       image voxel sizes of ~0.5–1.5 mm): every node with the strict rule
 *                       ({@code maxMismatchMm == toleranceMm}), else
 *                       {@value #PERCENTILE} % of them
 * @param maxMismatchMm  no node may be further than this, mm, ≥ toleranceMm: equal to the tolerance
 *                       for the strict rule; larger lets the iteration stop when only a few nodes
 *                       (typically in strongly distorted elements at the edge of the chest-wall
 *                       contact, which converge slowest) are still between the two
 * @param stallWindow    give up when the best RMS mismatch has not fallen by
 *                       {@value #STALL_PROGRESS} (relative) within this many forward solves; 0 never
 *                       (the iteration then runs to {@code maxIterations})
 * @param maxIterations  fixed-point iterations (forward solves) before giving up, ≥ 1 (default 40)
 * @param andersonDepth  number of previous iterates mixed by Anderson acceleration, ≥ 0; 0 gives
 *                       the plain fixed-point iteration (default 5)
 * @param holdBack       apply the local safeguard ({@link ReferenceStateSolver}: hold back the nodes of
 *                       elements a step would collapse) instead of failing on such a step (default true)
 */
public record ReferenceStateConfig(double toleranceMm, int maxIterations, int andersonDepth, double maxMismatchMm,
                                   int stallWindow, boolean holdBack) {

    /** Share of nodes (percent) that must meet the tolerance when {@code maxMismatchMm} is larger. */
    public static final double PERCENTILE = 99;
    /**
     * Fallback of the coarse rule (percent): when the iteration ends (forward solves used up, or stalled)
     * without meeting its rule, its best iterate (lowest RMS mismatch), solved again at the configured
     * tolerances, is accepted when every node is within {@code maxMismatchMm} and at least this share of
     * nodes within {@code toleranceMm}. The result says so ({@link ReferenceStateResult#fallback()}). Not
     * used by the strict rule.
     */
    public static final double FALLBACK_PERCENTILE = 95;
    /**
     * Without a stall test ({@code stallWindow} 0), the fallback is also tried as soon as the best RMS
     * mismatch has fallen by less than {@link #STALL_PROGRESS} in this many forward solves and the best
     * iterate meets the fallback rule; the iteration goes on if it does not.
     */
    public static final int FALLBACK_STALL_WINDOW = 10;
    /** Relative fall of the best RMS mismatch that counts as progress for the stall test. */
    public static final double STALL_PROGRESS = 0.1;

    /** The strict rule: every node within {@code toleranceMm}; no stall test. */
    public ReferenceStateConfig(double toleranceMm, int maxIterations, int andersonDepth) {
        this(toleranceMm, maxIterations, andersonDepth, toleranceMm, 0);
    }

    /** With the local safeguard. */
    public ReferenceStateConfig(double toleranceMm, int maxIterations, int andersonDepth, double maxMismatchMm,
                                int stallWindow) {
        this(toleranceMm, maxIterations, andersonDepth, maxMismatchMm, stallWindow, true);
    }

    /** No stall test. */
    public ReferenceStateConfig(double toleranceMm, int maxIterations, int andersonDepth, double maxMismatchMm) {
        this(toleranceMm, maxIterations, andersonDepth, maxMismatchMm, 0);
    }

    /** Validates all fields. */
    public ReferenceStateConfig {
        if (!(toleranceMm > 0) || !Double.isFinite(toleranceMm)) {
            throw new IllegalArgumentException("reference-state tolerance must be > 0 mm, got " + toleranceMm);
        }
        if (maxIterations < 1) {
            throw new IllegalArgumentException("maxIterations must be >= 1, got " + maxIterations);
        }
        if (!(maxMismatchMm >= toleranceMm) || !Double.isFinite(maxMismatchMm)) {
            throw new IllegalArgumentException("maxMismatchMm must be finite and >= the tolerance " + toleranceMm
                    + " mm, got " + maxMismatchMm);
        }
        if (stallWindow < 0) {
            throw new IllegalArgumentException("stallWindow must be >= 0, got " + stallWindow);
        }
        if (andersonDepth < 0 || andersonDepth > 20) {
            throw new IllegalArgumentException("andersonDepth must be in [0, 20], got " + andersonDepth);
        }
    }

    /** The documented defaults. */
    public static ReferenceStateConfig defaults() {
        return new ReferenceStateConfig(0.05, 40, 5);
    }
}
