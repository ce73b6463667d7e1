package org.turnmark.mechanics.solve;

import java.util.Arrays;

import org.turnmark.geom.Progress;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.mesh.HexMesh;

/**
 * Static equilibrium of a neo-Hookean hexahedral mesh under gravity (and optional nodal dead
 * loads): find u with R(u) = f_int(u) − λ f_ext = 0 at λ = 1, subject to {@link NodeConstraints}.
 *
 * <p>Units: node coordinates and displacements in mm, moduli in kPa (= mN/mm²), forces in mN,
 * energies in mN·mm; gravity in m/s² (RAS), giving the dead body force ρ·g·1e−6 mN/mm³ per unit
 * reference volume with ρ in kg/m³.
 *
 * <p>Algorithm: Newton–Raphson with the consistent tangent on increments of the load factor λ
 * ({@link SolverConfig#loadSteps()} equal increments at first). A rejected increment (no
 * convergence within the iteration limit, an inverted element, a failed linear solve) is halved
 * and retried from the last converged state; an increment that converged in few iterations lets the
 * next one grow by 1.5×. Each Newton correction is scaled by a backtracking (Armijo) line search on
 * the total potential energy Π = W(u) − λ f_extᵀu, which is +∞ for inverted elements, so no
 * accepted iterate folds. The start of each increment is extrapolated linearly from the last two
 * converged states. Convergence criteria are stated in {@link SolverConfig}. Results are
 * deterministic and identical for any thread count.
 *
 * <p>A warm start ({@code initialU}) first tries the full load directly from the given
 * displacement and falls back to load stepping from zero if that fails.
 *
 * <p>Not thread safe (keeps workspaces); one solve at a time per instance.
 */
public final class HyperelasticSolver {

    /** Newton iterations at or below which the next load increment may grow. */
    static final int EASY_ITERATIONS = 4;
    /** Armijo sufficient-decrease constant (Nocedal &amp; Wright, Numerical Optimization, §3.1). */
    static final double ARMIJO = 1e-4;
    /** Backtracking halvings before a Newton iteration is declared failed. */
    static final int MAX_BACKTRACKS = 10;
    /**
     * Relative size of energy changes treated as round-off in the line search: the energy is a sum
     * over ~1e4–1e5 element terms, so differences below ~1e−12 of its magnitude are noise.
     */
    static final double ENERGY_ROUNDOFF = 1e-12;
    /**
     * Cancellation in each element energy (J^(−2/3) I₁ − 3 and J² − 1 − 2 ln J near J = 1) leaves an
     * absolute error of a few ulps of (3μ + κ)·V per element; this factor times Σ(3μ + κ)V bounds
     * their sum with margin (10⁵ elements × 1e−16 × a few = 1e−10 is not reached in practice).
     */
    static final double ELEMENT_ROUNDOFF = 1e-13;

    /** First diagonal shift (relative to the mean diagonal) tried when the tangent is indefinite. */
    static final double MIN_SHIFT = 1e-3;
    /** Growth of the shift per failed attempt, and its decay per following Newton iteration. */
    static final double SHIFT_GROWTH = 10;
    /**
     * Largest shift: at 10× the mean diagonal the step is a small, heavily damped gradient-like
     * step; needing more means the state is not recoverable by regularisation.
     */
    static final double MAX_SHIFT = 10;

    /**
     * Relative force residual at which an intermediate load increment (λ &lt; 1) is accepted. The
     * equilibrium path of a hyperelastic body under dead loads does not depend on how exactly the
     * intermediate states are found: they only start the next increment, whose change of load
     * (tens of percent) is far larger than this error. The last increment (λ = 1) uses the
     * configured tolerances.
     */
    static final double INTERMEDIATE_RESIDUAL = 1e-3;
    /** Relative energy norm of an intermediate increment (≈ the square of its residual tolerance). */
    static final double INTERMEDIATE_ENERGY = 1e-6;

    /** Fraction of the Newton residual tolerance that the last linear solves aim for. */
    static final double OVERSOLVE_MARGIN = 0.1;

    /** Largest relative tolerance of a linear solve (far from the solution). */
    static final double FORCING_MAX = 1e-2;
    /** Linear tolerance = this × relative force residual (bounded below by the configured floor). */
    static final double FORCING_FACTOR = 1e-2;

    private final SolverConfig cfg;
    private final FeSystem sys;
    private final Projector proj;
    private final Pcg pcg = new Pcg();
    private final Preconditioner precond;
    private final int ndof;
    private int linearIterations;
    private int newtonIterations;
    /** Newton iterations of the current solve that needed a diagonal shift. */
    private int shiftedIterations;
    /** Relative diagonal shift to try first in the next Newton iteration (0: plain Newton). */
    private double shift;
    /** The shift that last made an indefinite tangent positive definite (kept across solves). */
    private double shiftHint;
    private String lastFailure = "";
    private double lastResidual;
    /** Effective Newton tolerances (the configured ones unless loosened by {@link #setTolerances}). */
    private double residualTol;
    private double energyTol;

    /**
     * Prepares a solver for one mesh: checks inputs and constraints, builds the sparsity pattern
     * and element colouring.
     *
     * @param mesh reference (unloaded) configuration
     * @param mats material per label; every label of the mesh must be present
     * @param bc   constraints; copied
     * @param cfg  settings
     * @throws IllegalArgumentException for an empty mesh, an unknown label, mismatched sizes, or a
     *                                  body (or disconnected piece) whose rigid motion the
     *                                  constraints do not prevent
     */
    public HyperelasticSolver(HexMesh mesh, MaterialTable mats, NodeConstraints bc, SolverConfig cfg) {
        if (mesh.elementCount() == 0) {
            throw new IllegalArgumentException("the mesh has no elements (empty tissue)");
        }
        if (bc.nodeCount() != mesh.nodeCount()) {
            throw new IllegalArgumentException("constraints are for " + bc.nodeCount() + " nodes but the mesh has "
                    + mesh.nodeCount());
        }
        if (cfg.nodalForcesMn() != null && cfg.nodalForcesMn().length != 3 * mesh.nodeCount()) {
            throw new IllegalArgumentException("nodalForcesMn must have 3 values per node (" + 3 * mesh.nodeCount()
                    + "), got " + cfg.nodalForcesMn().length);
        }
        this.cfg = cfg;
        NodeConstraints c = bc.copy();
        fixUnusedNodes(mesh, c);
        RigidModeCheck.requireNoFloatingPiece(mesh, c);
        this.sys = new FeSystem(mesh, mats, cfg.formulation());
        this.proj = new Projector(c);
        this.ndof = 3 * mesh.nodeCount();
        this.residualTol = cfg.residualTolerance();
        this.energyTol = cfg.energyTolerance();
        this.precond = cfg.linearSolver() == LinearSolverKind.PCG_MULTIGRID
                ? new AggregationMultigrid(mesh.xyzMm()) : new BlockJacobi();
    }

    /**
     * One-call form: prepares a solver and solves.
     *
     * @see #solve(double[], Progress, double[])
     */
    public static SolveResult solve(HexMesh mesh, MaterialTable mats, NodeConstraints bc, double[] gravityMs2,
                                    SolverConfig cfg, Progress progress, double[] initialU) {
        return new HyperelasticSolver(mesh, mats, bc, cfg).solve(gravityMs2, progress, initialU);
    }

    /**
     * Solves for the equilibrium under gravity {@code gravityMs2} plus the configured nodal loads.
     *
     * @param gravityMs2 gravitational acceleration, RAS, m/s², length 3, e.g. supine {0, −9.81, 0}
     * @param progress   progress sink and cancellation (stage "gravity solve", fraction = load factor)
     * @param initialU   optional warm start (3 per node, mm), not modified; null to start from zero
     * @return the converged displacement and diagnostics
     * @throws SolverDivergedException       if the load cannot be applied (last residual, load fraction)
     * @throws Progress.CancelledException if cancelled
     */
    public SolveResult solve(double[] gravityMs2, Progress progress, double[] initialU) {
        long t0 = System.nanoTime();
        if (gravityMs2 == null || gravityMs2.length != 3) {
            throw new IllegalArgumentException("gravity must be a vector of 3 components (m/s2)");
        }
        for (double g : gravityMs2) {
            if (!Double.isFinite(g)) {
                throw new IllegalArgumentException("gravity components must be finite, got " + Arrays.toString(gravityMs2));
            }
        }
        if (initialU != null && initialU.length != ndof) {
            throw new IllegalArgumentException("initial displacement must have " + ndof + " values, got " + initialU.length);
        }
        Progress prog = progress == null ? Progress.NONE : progress;
        linearIterations = 0;
        newtonIterations = 0;
        shiftedIterations = 0;
        double[] fext = new double[ndof];
        sys.gravityLoad(gravityMs2, fext);
        if (cfg.nodalForcesMn() != null) {
            for (int i = 0; i < ndof; i++) {
                fext[i] += cfg.nodalForcesMn()[i];
            }
        }
        Step st = new Step(ndof);
        int steps = 0;
        int cuts = 0;
        if (initialU != null) {
            for (int i = 0; i < ndof; i++) {
                if (!Double.isFinite(initialU[i])) {
                    throw new IllegalArgumentException("initial displacement [" + i + "] is not finite");
                }
            }
            System.arraycopy(initialU, 0, st.u, 0, ndof);
            proj.project(st.u);
            if (newton(1.0, fext, st, prog)) {
                return result(st, 1, 0, t0);
            }
            cuts++;
        }
        double[] u = new double[ndof];
        double[] uPrev = new double[ndof];
        double lambda = 0;
        double lambdaPrev = 0;
        double dl = 1.0 / cfg.loadSteps();
        while (lambda < 1) {
            prog.checkCancelled();
            double target = Math.min(1.0, lambda + dl);
            if (1.0 - target < 1e-12) {
                target = 1.0;
            }
            // predictor: linear extrapolation from the last two converged states
            double ratio = lambda > lambdaPrev ? (target - lambda) / (lambda - lambdaPrev) : 0;
            for (int i = 0; i < ndof; i++) {
                st.u[i] = u[i] + ratio * (u[i] - uPrev[i]);
            }
            boolean ok = newton(target, fext, st, prog);
            if (!ok && ratio != 0) {
                System.arraycopy(u, 0, st.u, 0, ndof);
                ok = newton(target, fext, st, prog);
            }
            if (ok) {
                System.arraycopy(u, 0, uPrev, 0, ndof);
                System.arraycopy(st.u, 0, u, 0, ndof);
                lambdaPrev = lambda;
                lambda = target;
                steps++;
                prog.update("gravity solve", lambda);
                if (st.iterations <= EASY_ITERATIONS) {
                    dl *= 1.5;
                }
            } else {
                cuts++;
                dl = 0.5 * (target - lambda);
                if (dl < cfg.minLoadIncrement()) {
                    throw new SolverDivergedException(lastFailure + " (load increment " + (target - lambda)
                            + " after " + cuts + " cuts)", lastResidual, lambda);
                }
            }
        }
        return result(st, steps, cuts, t0);
    }

    /**
     * Moves the reference (unloaded) node positions, keeping topology, materials, constraints and
     * solver workspaces (for the reference-state iteration).
     *
     * @param xyzMm new reference coordinates, 3 per node, mm; copied
     * @throws org.turnmark.mechanics.element.InvertedElementException if an element degenerates
     */
    void moveReference(double[] xyzMm) {
        sys.moveReference(xyzMm.clone());
    }

    /**
     * Sets the Newton convergence tolerances of the following solves (for inexact inner solves of
     * the reference-state iteration); never tighter than configured.
     *
     * @param residualTolerance relative force residual
     * @param energyTolerance   relative energy norm
     */
    void setTolerances(double residualTolerance, double energyTolerance) {
        this.residualTol = Math.max(cfg.residualTolerance(), residualTolerance);
        this.energyTol = Math.max(cfg.energyTolerance(), energyTolerance);
    }

    /** True if the solves use the configured (not loosened) tolerances. */
    boolean configuredTolerances() {
        return residualTol == cfg.residualTolerance() && energyTol == cfg.energyTolerance();
    }

    /** The current reference mesh. */
    HexMesh referenceMesh() {
        return sys.mesh;
    }

    private SolveResult result(Step st, int steps, int cuts, long t0) {
        long ms = (System.nanoTime() - t0) / 1_000_000;
        return new SolveResult(st.u.clone(), true, steps, cuts, newtonIterations, linearIterations, st.residual,
                st.relResidual, st.relEnergy, st.energy, st.minDetF, ms,
                Arrays.copyOf(st.history, st.historyLength), shiftedIterations);
    }

    /** Newton state of one load increment. */
    private static final class Step {
        final double[] u;
        final double[] r;
        final double[] du;
        final double[] rhs;
        final double[] trial;
        final double[] detF = new double[1];
        int iterations;
        double[] history = new double[8];
        int historyLength;
        double residual;
        double relResidual;
        double relEnergy;
        double energy;
        double minDetF;

        Step(int n) {
            u = new double[n];
            r = new double[n];
            du = new double[n];
            rhs = new double[n];
            trial = new double[n];
        }
    }

    /** Newton iterations at load factor lambda from st.u; true on convergence (st.u updated). */
    private boolean newton(double lambda, double[] fext, Step st, Progress prog) {
        st.iterations = 0;
        shift = 0;
        double w = sys.assemble(st.u, st.r, true, st.detF);
        if (!Double.isFinite(w)) {
            lastFailure = "element inverted at the start of the increment (min det F " + st.detF[0] + ")";
            return false;
        }
        residual(lambda, fext, st.r);
        double fnorm = scaledNorm(lambda, fext);
        double rn = VecOps.norm(st.r);
        if (fnorm == 0) {
            fnorm = rn > 0 ? rn : 1;
        }
        lastResidual = rn;
        st.historyLength = 0;
        record(st, rn / fnorm);
        double e0 = 0;
        double relE = 1;
        // intermediate load increments only lead to the final one: converge them loosely
        final double rTol = lambda < 1 ? Math.max(residualTol, INTERMEDIATE_RESIDUAL) : residualTol;
        final double eTol = lambda < 1 ? Math.max(energyTol, INTERMEDIATE_ENERGY) : energyTol;
        if (rn <= rTol * fnorm) {
            finish(st, w, rn, fnorm, 0, lambda, fext);
            return true;
        }
        for (int it = 1; it <= cfg.maxNewtonIterations(); it++) {
            prog.checkCancelled();
            newtonIterations++;
            st.iterations = it;
            proj.projectMatrix(sys.k);
            for (int i = 0; i < ndof; i++) {
                st.rhs[i] = -st.r[i];
            }
            // inexact Newton: forcing term proportional to the relative residual keeps the local
            // convergence quadratic (Dembo, Eisenstat & Steihaug, SIAM J Numer Anal 19, 1982)
            double eta = Math.max(cfg.linearTolerance(), Math.min(FORCING_MAX, FORCING_FACTOR * rn / fnorm));
            // ... but never more accurate than the Newton tolerance needs: a linear residual of a
            // tenth of the tolerance is below what this iteration must reach (Eisenstat & Walker,
            // SIAM J Sci Comput 17, 1996, safeguard against oversolving)
            eta = Math.max(eta, Math.min(FORCING_MAX, OVERSOLVE_MARGIN * rTol * fnorm / rn));
            if (!linearSolve(st, it == 1, eta)) {
                return false;
            }
            double slope = VecOps.dot(st.du, st.r);
            double en = Math.abs(slope);
            if (it == 1) {
                e0 = en > 0 ? en : 1;
            }
            relE = en / e0;
            // line search on Π(u + α du)
            double alpha = 1;
            double pi0 = w - lambda * VecOps.dot(fext, st.u);
            boolean accepted = false;
            for (int bt = 0; bt <= (cfg.lineSearch() ? MAX_BACKTRACKS : 0); bt++) {
                for (int i = 0; i < ndof; i++) {
                    st.trial[i] = st.u[i] + alpha * st.du[i];
                }
                double wt = sys.energy(st.trial, st.detF);
                if (Double.isFinite(wt)) {
                    if (!cfg.lineSearch()) {
                        accepted = true;
                        break;
                    }
                    double work = lambda * VecOps.dot(fext, st.trial);
                    double pit = wt - work;
                    double noise = ENERGY_ROUNDOFF * (Math.abs(wt) + Math.abs(w) + Math.abs(work) + Math.abs(pi0))
                            + ELEMENT_ROUNDOFF * sys.energyScale;
                    if (pit <= pi0 + ARMIJO * alpha * slope + noise) {
                        accepted = true;
                        break;
                    }
                }
                alpha *= 0.5;
            }
            if (!accepted) {
                lastFailure = Double.isFinite(sys.energy(st.trial, st.detF))
                        ? "line search found no decrease of the potential energy"
                        : "element inverted (min det F " + st.detF[0] + ")";
                return false;
            }
            System.arraycopy(st.trial, 0, st.u, 0, ndof);
            w = sys.assemble(st.u, st.r, true, st.detF);
            if (!Double.isFinite(w)) {
                lastFailure = "element inverted (min det F " + st.detF[0] + ")";
                return false;
            }
            residual(lambda, fext, st.r);
            rn = VecOps.norm(st.r);
            lastResidual = rn;
            record(st, rn / fnorm);
            if (!Double.isFinite(rn)) {
                lastFailure = "non-finite residual";
                return false;
            }
            if (rn <= rTol * fnorm && relE <= eTol) {
                finish(st, w, rn, fnorm, relE, lambda, fext);
                return true;
            }
        }
        lastFailure = "no convergence in " + cfg.maxNewtonIterations() + " Newton iterations (relative residual "
                + String.format("%.3g", rn / fnorm) + ")";
        return false;
    }

    /**
     * Solves K du = rhs for the Newton correction. Away from equilibrium (a warm start, a large
     * increment) the consistent tangent of a compressed neo-Hookean body can be indefinite; then the
     * step uses K + τ·d̄·I instead (Levenberg–Marquardt regularisation; Nocedal &amp; Wright,
     * Numerical Optimization, §4 and §10.3), with d̄ the mean diagonal entry of K and τ raised by
     * {@link #SHIFT_GROWTH} (from the shift that last worked, or {@link #MIN_SHIFT}) until the
     * shifted matrix is positive definite. Any positive definite
     * matrix gives a descent direction for the energy line search; the shift is reduced by the
     * same factor on each following iteration, so the final iterations are plain Newton steps and
     * keep their quadratic convergence.
     *
     * @return false (with {@link #lastFailure} set) if no shift up to {@link #MAX_SHIFT} helps
     */
    private boolean linearSolve(Step st, boolean firstIteration, double eta) {
        boolean fullSetup = firstIteration;
        double tau = shift;
        boolean escalated = false;
        double meanDiag = tau > 0 ? meanDiagonal(sys.k) : 0;   // of the unshifted tangent
        double applied = 0;                                     // absolute shift now in sys.k
        while (true) {
            try {
                if (tau > 0) {
                    addDiagonal(sys.k, tau * meanDiag - applied);
                    applied = tau * meanDiag;
                }
                if (fullSetup) {
                    precond.setup(sys.k);
                } else {
                    // a changed shift reaches the multigrid's coarse operators without a new setup
                    precond.refresh(sys.k, applied);
                }
                linearIterations += pcg.solve(sys.k, precond, st.rhs, st.du, eta, cfg.maxLinearIterations());
                // the multigrid coarse correction is not confined to the admissible subspace, so the
                // iterate carries round-off-sized constrained components: remove them exactly
                proj.project(st.du);
                shift = tau / SHIFT_GROWTH < MIN_SHIFT ? 0 : tau / SHIFT_GROWTH;
                if (escalated) {
                    shiftHint = tau;
                }
                if (tau > 0) {
                    shiftedIterations++;
                }
                return true;
            } catch (LinearSolveException ex) {
                if (!ex.indefinite() || tau >= MAX_SHIFT) {
                    lastFailure = "linear solve failed: " + ex.getMessage()
                            + (tau > 0 ? String.format(" (with a diagonal shift of %.3g × the mean diagonal)", tau) : "");
                    return false;
                }
                // start from the shift that last cured an indefinite tangent (the same body in a
                // similar state usually needs a similar shift), else from the smallest
                if (tau == 0) {
                    meanDiag = meanDiagonal(sys.k);
                }
                tau = tau == 0 ? Math.max(MIN_SHIFT, shiftHint) : tau * SHIFT_GROWTH;
                escalated = true;
                fullSetup = false;
            }
        }
    }

    /** Mean of the diagonal entries of the (projected) tangent; 1 if none is positive. */
    private static double meanDiagonal(BlockCsr a) {
        double s = 0;
        int n = 0;
        for (int r = 0; r < a.rows; r++) {
            int d = 9 * a.diag[r];
            for (int i = 0; i < 3; i++) {
                double v = a.val[d + 4 * i];
                if (v > 0) {
                    s += v;
                    n++;
                }
            }
        }
        return n > 0 ? s / n : 1;
    }

    /** A ← A + c I. */
    private static void addDiagonal(BlockCsr a, double c) {
        for (int r = 0; r < a.rows; r++) {
            int d = 9 * a.diag[r];
            a.val[d] += c;
            a.val[d + 4] += c;
            a.val[d + 8] += c;
        }
    }

    private static void record(Step st, double rel) {
        if (st.historyLength == st.history.length) {
            st.history = Arrays.copyOf(st.history, 2 * st.historyLength);
        }
        st.history[st.historyLength++] = rel;
    }

    private void finish(Step st, double w, double rn, double fnorm, double relE, double lambda, double[] fext) {
        st.residual = rn;
        st.relResidual = rn / fnorm;
        st.relEnergy = relE;
        st.energy = w;
        st.minDetF = st.detF[0];
    }

    /** r ← P (r − λ f_ext). */
    private void residual(double lambda, double[] fext, double[] r) {
        for (int i = 0; i < ndof; i++) {
            r[i] -= lambda * fext[i];
        }
        proj.project(r);
    }

    private double scaledNorm(double lambda, double[] fext) {
        double[] t = new double[ndof];
        for (int i = 0; i < ndof; i++) {
            t[i] = lambda * fext[i];
        }
        proj.project(t);
        return VecOps.norm(t);
    }

    private static void fixUnusedNodes(HexMesh mesh, NodeConstraints c) {
        boolean[] used = new boolean[mesh.nodeCount()];
        for (int v : mesh.hex()) {
            used[v] = true;
        }
        for (int n = 0; n < used.length; n++) {
            if (!used[n]) {
                c.fix(n);
            }
        }
    }
}
