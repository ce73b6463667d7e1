package org.turnmark.registration.diffeo;

/**
 * Diagnostics of one pyramid level.
 *
 * @param level           0 = finest; listed coarsest first in the result
 * @param nx              level grid size along i
 * @param ny              level grid size along j
 * @param nz              level grid size along k
 * @param spacingMm       level voxel spacing along i, j, k (mm)
 * @param costBefore      cost at the start of the level (metric units; lower is better)
 * @param costAfter       cost at the end of the level
 * @param iterations      iterations run
 * @param costIncreases   iterations whose cost rose (each halves the step)
 * @param stopReason      why the level ended
 * @param seconds         wall time of the level (s)
 */
public record LevelReport(int level, int nx, int ny, int nz, double[] spacingMm, double costBefore, double costAfter,
                          int iterations, int costIncreases, StopReason stopReason, double seconds) {

    public LevelReport {
        spacingMm = spacingMm.clone();
    }

    @Override
    public double[] spacingMm() {
        return spacingMm.clone();
    }
}
