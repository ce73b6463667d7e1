package org.turnmark.registration.diffeo;

/** Why the optimisation at one pyramid level ended. */
public enum StopReason {
    /** The iteration budget of the level was used up. */
    ITERATIONS,
    /** The relative cost decrease over the convergence window fell below the tolerance. */
    CONVERGED,
    /** No step, down to the smallest step scale, decreased the cost. */
    NO_DESCENT
}
