package org.turnmark.mechanics.solve;

/**
 * A converged static equilibrium and its diagnostics. Only converged states are returned (a solve
 * that fails throws {@link SolverDivergedException}), so {@code converged} is always true; it is
 * kept for callers that store results.
 *
 * @param u                   nodal displacements, 3 per node (x, y, z), world mm (RAS)
 * @param converged           always true for a returned result
 * @param loadSteps           accepted load increments
 * @param cutSteps            load increments rejected and halved
 * @param newtonIterations    Newton iterations over all increments (including rejected ones)
 * @param linearIterations    conjugate-gradient iterations over all linear solves
 * @param residualNormMn      final ‖P R‖₂ (free directions), mN
 * @param relativeResidual    final ‖P R‖₂ / ‖P F_ext‖₂
 * @param relativeEnergyNorm  final |Δu·R| relative to the first correction of the last increment
 * @param strainEnergyMnMm    total strain energy at the solution, mN·mm (µJ)
 * @param minDetF             smallest det F over all Gauss points at the solution
 * @param timeMs              wall time, ms
 * @param lastIncrementResiduals relative force residual ‖P R‖/‖P F_ext‖ before the first and after
 *                            each Newton iteration of the last load increment (for convergence
 *                            studies)
 * @param shiftedIterations   Newton iterations (over all increments) whose tangent was indefinite
 *                            and needed a diagonal shift (Levenberg–Marquardt step)
 */
public record SolveResult(double[] u, boolean converged, int loadSteps, int cutSteps, int newtonIterations,
                          int linearIterations, double residualNormMn, double relativeResidual,
                          double relativeEnergyNorm, double strainEnergyMnMm, double minDetF, long timeMs,
                          double[] lastIncrementResiduals, int shiftedIterations) {

    /** Largest nodal displacement magnitude, mm. */
    public double maxDisplacementMm() {
        double m = 0;
        for (int n = 0; n < u.length; n += 3) {
            m = Math.max(m, Math.sqrt(u[n] * u[n] + u[n + 1] * u[n + 1] + u[n + 2] * u[n + 2]));
        }
        return m;
    }

    @Override
    public String toString() {
        return String.format("SolveResult{steps=%d (cut %d), newton=%d (shifted %d), linear=%d, residual=%.3g mN (rel %.3g),"
                        + " energyNorm=%.3g, energy=%.6g mN*mm, minDetF=%.4f, maxU=%.3f mm, time=%d ms}",
                loadSteps, cutSteps, newtonIterations, shiftedIterations, linearIterations, residualNormMn, relativeResidual,
                relativeEnergyNorm, strainEnergyMnMm, minDetF, maxDisplacementMm(), timeMs);
    }
}
