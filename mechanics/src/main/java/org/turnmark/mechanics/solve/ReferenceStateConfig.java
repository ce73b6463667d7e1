package org.turnmark.mechanics.solve;

/**
 * Settings of {@link ReferenceStateSolver}.
 *
 * @param toleranceMm    stop when every node of the reloaded reference lies within this distance of
 *                       its loaded (observed) position, mm, &gt; 0 (default 0.05 mm, well below
 *                       image voxel sizes of ~0.5–1.5 mm)
 * @param maxIterations  fixed-point iterations (forward solves) before giving up, ≥ 1 (default 40)
 * @param andersonDepth  number of previous iterates mixed by Anderson acceleration, ≥ 0; 0 gives
 *                       the plain fixed-point iteration (default 5)
 */
public record ReferenceStateConfig(double toleranceMm, int maxIterations, int andersonDepth) {

    /** Validates all fields. */
    public ReferenceStateConfig {
        if (!(toleranceMm > 0) || !Double.isFinite(toleranceMm)) {
            throw new IllegalArgumentException("reference-state tolerance must be > 0 mm, got " + toleranceMm);
        }
        if (maxIterations < 1) {
            throw new IllegalArgumentException("maxIterations must be >= 1, got " + maxIterations);
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
