package org.turnmark.mechanics.solve;

/** Linear solver for the Newton systems (all matrix-free of fill-in, deterministic). */
public enum LinearSolverKind {
    /** Conjugate gradients with a block-Jacobi (3×3 nodal block) preconditioner. */
    PCG_BLOCK_JACOBI,
    /**
     * Conjugate gradients preconditioned by one V-cycle of an aggregation multigrid with rigid-body
     * coarse modes (see {@code AggregationMultigrid}). The default.
     */
    PCG_MULTIGRID
}
