package org.turnmark.mechanics.solve;

import org.turnmark.mechanics.element.HexFormulation;

/**
 * Settings of {@link HyperelasticSolver}. Immutable and validated; use {@link #defaults()} and the
 * {@code withXxx} methods.
 *
 * <p>Convergence of a load step (both must hold): ‖P R‖₂ ≤ {@code residualTolerance}·‖P F_ext(λ)‖₂
 * (relative force residual; P removes reactions at constrained nodes) and
 * |Δuᵢ·Rᵢ₋₁| ≤ {@code energyTolerance}·|Δu₁·R₀| (energy norm of the Newton correction relative
 * to the first one of the step; Bathe, Finite Element Procedures, §8.4).
 *
 * @param formulation         element formulation (default mean dilatation)
 * @param loadSteps           initial number of equal load increments, ≥ 1 (default 8)
 * @param minLoadIncrement    smallest load increment before giving up, in (0, 1] (default 1/1024)
 * @param maxNewtonIterations Newton iterations per load step before the step is cut (default 25)
 * @param residualTolerance   relative force residual, (0, 1) (default 1e−6)
 * @param energyTolerance     relative energy norm, (0, 1) (default 1e−10)
 * @param linearSolver        linear solver (default {@link LinearSolverKind#PCG_MULTIGRID})
 * @param linearTolerance     floor of the relative residual of each linear solve, (0, 1) (default
 *                            1e−10); the tolerance used is max(floor, min(1e−2, 1e−2·‖P R‖/‖P F_ext‖))
 *                            (inexact Newton)
 * @param maxLinearIterations conjugate-gradient iterations per linear solve (default 5000)
 * @param lineSearch          backtracking line search on the total potential energy (default on)
 * @param nodalForcesMn       optional extra dead loads, 3 per node, mN, scaled with the load factor
 *                            like gravity; null for none
 */
public record SolverConfig(HexFormulation formulation, int loadSteps, double minLoadIncrement,
                           int maxNewtonIterations, double residualTolerance, double energyTolerance,
                           LinearSolverKind linearSolver, double linearTolerance, int maxLinearIterations,
                           boolean lineSearch, double[] nodalForcesMn) {

    /** Validates all fields. */
    public SolverConfig {
        if (formulation == null) {
            throw new IllegalArgumentException("formulation must not be null");
        }
        if (linearSolver == null) {
            throw new IllegalArgumentException("linearSolver must not be null");
        }
        if (loadSteps < 1) {
            throw new IllegalArgumentException("loadSteps must be >= 1, got " + loadSteps);
        }
        if (!(minLoadIncrement > 0 && minLoadIncrement <= 1)) {
            throw new IllegalArgumentException("minLoadIncrement must be in (0, 1], got " + minLoadIncrement);
        }
        if (maxNewtonIterations < 1) {
            throw new IllegalArgumentException("maxNewtonIterations must be >= 1, got " + maxNewtonIterations);
        }
        checkFraction("residualTolerance", residualTolerance);
        checkFraction("energyTolerance", energyTolerance);
        checkFraction("linearTolerance", linearTolerance);
        if (maxLinearIterations < 1) {
            throw new IllegalArgumentException("maxLinearIterations must be >= 1, got " + maxLinearIterations);
        }
        if (nodalForcesMn != null) {
            for (int i = 0; i < nodalForcesMn.length; i++) {
                if (!Double.isFinite(nodalForcesMn[i])) {
                    throw new IllegalArgumentException("nodalForcesMn[" + i + "] must be finite, got " + nodalForcesMn[i]);
                }
            }
        }
    }

    private static void checkFraction(String name, double v) {
        if (!(v > 0 && v < 1)) {
            throw new IllegalArgumentException(name + " must be in (0, 1), got " + v);
        }
    }

    /** The documented defaults. */
    public static SolverConfig defaults() {
        return new SolverConfig(HexFormulation.MEAN_DILATATION, 8, 1.0 / 1024, 25, 1e-6, 1e-10,
                LinearSolverKind.PCG_MULTIGRID, 1e-10, 5000, true, null);
    }

    /** A copy with another formulation. */
    public SolverConfig withFormulation(HexFormulation f) {
        return new SolverConfig(f, loadSteps, minLoadIncrement, maxNewtonIterations, residualTolerance,
                energyTolerance, linearSolver, linearTolerance, maxLinearIterations, lineSearch, nodalForcesMn);
    }

    /** A copy with another initial number of load steps. */
    public SolverConfig withLoadSteps(int n) {
        return new SolverConfig(formulation, n, minLoadIncrement, maxNewtonIterations, residualTolerance,
                energyTolerance, linearSolver, linearTolerance, maxLinearIterations, lineSearch, nodalForcesMn);
    }

    /** A copy with another smallest load increment. */
    public SolverConfig withMinLoadIncrement(double v) {
        return new SolverConfig(formulation, loadSteps, v, maxNewtonIterations, residualTolerance,
                energyTolerance, linearSolver, linearTolerance, maxLinearIterations, lineSearch, nodalForcesMn);
    }

    /** A copy with another Newton iteration limit per load step. */
    public SolverConfig withMaxNewtonIterations(int n) {
        return new SolverConfig(formulation, loadSteps, minLoadIncrement, n, residualTolerance,
                energyTolerance, linearSolver, linearTolerance, maxLinearIterations, lineSearch, nodalForcesMn);
    }

    /** A copy with other Newton tolerances. */
    public SolverConfig withTolerances(double residual, double energy) {
        return new SolverConfig(formulation, loadSteps, minLoadIncrement, maxNewtonIterations, residual,
                energy, linearSolver, linearTolerance, maxLinearIterations, lineSearch, nodalForcesMn);
    }

    /** A copy with another linear solver and its tolerance. */
    public SolverConfig withLinearSolver(LinearSolverKind kind, double tolerance) {
        return new SolverConfig(formulation, loadSteps, minLoadIncrement, maxNewtonIterations, residualTolerance,
                energyTolerance, kind, tolerance, maxLinearIterations, lineSearch, nodalForcesMn);
    }

    /** A copy with another linear iteration limit. */
    public SolverConfig withMaxLinearIterations(int n) {
        return new SolverConfig(formulation, loadSteps, minLoadIncrement, maxNewtonIterations, residualTolerance,
                energyTolerance, linearSolver, linearTolerance, n, lineSearch, nodalForcesMn);
    }

    /** A copy with the line search on or off. */
    public SolverConfig withLineSearch(boolean on) {
        return new SolverConfig(formulation, loadSteps, minLoadIncrement, maxNewtonIterations, residualTolerance,
                energyTolerance, linearSolver, linearTolerance, maxLinearIterations, on, nodalForcesMn);
    }

    /** A copy with extra nodal dead loads (3 per node, mN; null for none). */
    public SolverConfig withNodalForces(double[] forcesMn) {
        return new SolverConfig(formulation, loadSteps, minLoadIncrement, maxNewtonIterations, residualTolerance,
                energyTolerance, linearSolver, linearTolerance, maxLinearIterations, lineSearch, forcesMn);
    }
}
