package org.turnmark.mechanics.solve;

import org.turnmark.mechanics.mesh.HexMesh;

/**
 * An estimated gravity-free reference configuration.
 *
 * @param reference          reference (unloaded) mesh: the loaded mesh's topology at the reference
 *                           node positions, world mm
 * @param uToLoaded          displacement from the reference to the loaded configuration under the
 *                           given gravity, 3 per node, mm (reference + u ≈ loaded)
 * @param iterations         forward solves used by the iteration (0 for reverse gravity)
 * @param maxMismatchMm      max over nodes of |reference + u − loaded|, mm, of the returned state
 * @param mismatchHistoryMm  max nodal mismatch after each forward solve, mm
 * @param newtonIterations   Newton iterations over all forward solves
 * @param linearIterations   conjugate-gradient iterations over all forward solves
 * @param timeMs             wall time, ms
 * @param method             "fixed-point (Anderson m)" or "reverse gravity (biased)"
 * @param lastSolve          diagnostics of the forward solve of the returned reference (load steps,
 *                           residuals, smallest det F)
 * @param heldNodes          nodes whose step was held back in the returned iterate so that no element of
 *                           the reference collapses; their mismatch may exceed the coarse bound (see
 *                           {@link ReferenceStateSolver}); 0 when none
 * @param withinPercent      share of the nodes (percent) within the tolerance in the returned state; NaN
 *                           for reverse gravity, which has no tolerance
 * @param fallback           true when the iteration did not meet its rule and its best iterate was
 *                           accepted by the fallback rule ({@link ReferenceStateConfig#FALLBACK_PERCENTILE})
 */
public record ReferenceStateResult(HexMesh reference, double[] uToLoaded, int iterations, double maxMismatchMm,
                                   double[] mismatchHistoryMm, int newtonIterations, int linearIterations,
                                   long timeMs, String method, SolveResult lastSolve, int heldNodes,
                                   double withinPercent, boolean fallback) {
}
