package org.turnmark.mechanics.solve;

/**
 * The nonlinear solve did not converge: load increments were cut below the smallest allowed one.
 * Carries the last force residual and the load fraction reached; no displacement is offered.
 */
public final class SolverDivergedException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    private final double lastResidualMn;
    private final double loadFraction;

    /**
     * @param cause          what failed last (e.g. "element inverted", "no convergence in 25 iterations")
     * @param lastResidualMn last force residual norm, mN
     * @param loadFraction   load fraction of the last converged state, in [0, 1)
     */
    public SolverDivergedException(String cause, double lastResidualMn, double loadFraction) {
        super(String.format("finite-element solve did not converge: %s; last force residual %.4g mN; "
                + "reached load fraction %.4f of the full load", cause, lastResidualMn, loadFraction));
        this.lastResidualMn = lastResidualMn;
        this.loadFraction = loadFraction;
    }

    /** Last force residual norm, mN. */
    public double lastResidualMn() {
        return lastResidualMn;
    }

    /** Load fraction of the last converged state. */
    public double loadFraction() {
        return loadFraction;
    }
}
