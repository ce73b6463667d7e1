package org.turnmark.mechanics.solve;

import java.util.Arrays;

import org.turnmark.geom.Progress;
import org.turnmark.mechanics.element.InvertedElementException;
import org.turnmark.mechanics.element.ReferenceGeometry;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.mesh.HexMesh;

/**
 * Gravity-free reference configuration from a loaded (e.g. prone) configuration.
 *
 * <p>Find reference node positions X such that the forward gravity solve φ(X) (the deformed
 * positions X + u(X) under gravity g) reproduces the observed loaded positions x: the
 * backward-displacement fixed-point iteration X ← X − (φ(X) − x) (REFERENCE §6; Bols et al.,
 * ESAIM M2AN 47, 2013) accelerated by Anderson mixing of depth m (Anderson, J ACM 12, 1965;
 * Walker &amp; Ni, SIAM J Numer Anal 49, 2011, type II). Each forward solve is warm-started from the
 * previous displacement. Stops when max_n |φ(X)_n − x_n| ≤ tolerance (mm), or, with a larger
 * {@link ReferenceStateConfig#maxMismatchMm()}, when 99 % of the nodes are within the tolerance and
 * all within that bound. If an accelerated
 * iterate cannot be solved (an element inverts), a damped plain fixed-point step is taken instead and the
 * history is cleared; the step is then relaxed (X ← X + β f with β halved, kept for later
 * steps). Before each forward solve a local safeguard holds back the nodes of any element that the
 * step would collapse (see {@link #holdBack}): where the observed loaded mesh cannot be reproduced
 * exactly (typically a strongly compressed element at the edge of the chest-wall contact) the
 * iteration leaves a local mismatch there instead of inverting the element and stalling everywhere.
 * Constrained nodes keep their loaded positions along the constrained
 * directions (fixed nodes stay put, sliding nodes stay on their plane).
 *
 * <p>{@link #reverseGravity} is the naive shortcut X = x + u_(−g)(x): exact only in linear
 * elasticity (Whiteley, J Theor Med 6(3), 2005) and biased at the large strains of breast tissue;
 * its result reports the actual mismatch after one verifying forward solve.
 *
 * <p>Not thread safe; stateless between calls.
 */
public final class ReferenceStateSolver {

    /**
     * Smallest step relaxation β before giving up: each failed forward solve (an element of the
     * candidate reference inverts) halves β; five halvings (β = 1/32) cover strongly nonlinear
     * first steps while bounding the wasted solves.
     */
    static final double MIN_RELAXATION = 1.0 / 32;
    /**
     * An RMS mismatch this many times the best so far means the iteration is running away: it
     * returns to the best iterate and continues with damped plain steps.
     */
    static final double RUNAWAY = 2;
    /**
     * An element of a candidate reference whose smallest Gauss-point det(∂X/∂ξ) falls below this
     * fraction of the loaded element's (and below the last solved iterate's) is collapsing: its nodes
     * are held back. Breast tissue is nearly incompressible (ν ≈ 0.45–0.5), so a reference element
     * has about its loaded volume; a fifth of it is far outside any physical state and still well
     * short of the inversion that stops the forward solve.
     */
    static final double MIN_VOLUME_RATIO = 0.2;
    /** Halvings of a held-back node's step before it returns to the last solved iterate. */
    static final int HOLD_BACK_HALVINGS = 6;
    /**
     * With a coarse rule ({@link ReferenceStateConfig#maxMismatchMm()} above the tolerance), nodes held
     * back in the accepted iterate may exceed that bound by up to this factor (they still count
     * against the 1 % allowed above the tolerance): their loaded positions cannot be reproduced without
     * collapsing an element, and the factor keeps a held region from hiding a gross failure.
     */
    static final double HELD_MISMATCH_FACTOR = 2;
    /** Growth of the relaxation after a step that reduced the RMS mismatch (back to 1 at most). */
    static final double RELAXATION_RECOVERY = 1.5;

    /**
     * Inexact forward solves: while the last mismatch exceeds this many times the tolerance (and
     * for the first solve), forward solves stop at the loose tolerances below. Their displacement
     * error (≈ 1e−4 relative, i.e. ≲ 0.01 mm here) is far below the mismatch being corrected, so the
     * iteration path is barely changed; a solve that meets the tolerance while loose is repeated
     * at the configured tolerances before it is accepted.
     */
    static final double LOOSE_FACTOR = 10;
    /**
     * ... or this many mm, whichever is smaller: a loose solve's displacement error (≲ 0.01 mm)
     * stays far below a mismatch of 0.5 mm, so a coarse tolerance (e.g. the planner's 0.5 mm) does
     * not force tight solves through the whole iteration.
     */
    static final double LOOSE_MAX_MM = 0.5;
    /** Relative force residual of a loose forward solve. */
    static final double LOOSE_RESIDUAL = 1e-4;
    /** Relative energy norm of a loose forward solve. */
    static final double LOOSE_ENERGY = 1e-7;

    private ReferenceStateSolver() {
    }

    /**
     * Estimates the reference configuration.
     *
     * @param loaded     observed loaded mesh (world mm)
     * @param mats       materials per label
     * @param bc         constraints (by node index; the same for reference and loaded mesh)
     * @param gravityMs2 gravity acting in the loaded configuration, RAS, m/s²
     * @param cfg        forward solver settings
     * @param rcfg       iteration settings
     * @param progress   progress ("reference state", fraction of the iteration limit) and cancellation
     * @return the reference mesh and diagnostics
     * @throws SolverDivergedException if the iteration does not reach the tolerance in
     *                                 {@code maxIterations} forward solves (message gives the
     *                                 last mismatch), or a forward solve fails
     */
    public static ReferenceStateResult solve(HexMesh loaded, MaterialTable mats, NodeConstraints bc,
                                             double[] gravityMs2, SolverConfig cfg, ReferenceStateConfig rcfg,
                                             Progress progress) {
        return solve(loaded, mats, bc, gravityMs2, cfg, rcfg, progress, null, null);
    }

    /**
     * Estimates the reference configuration from a starting guess, e.g. the reference state of a
     * nearby parameter set (uncertainty sampling).
     *
     * @param startX reference node positions to start from (3 per node, mm), or null for the loaded
     *               positions
     * @param startU displacement from {@code startX} to warm-start the first forward solve (3 per
     *               node, mm), or null for none
     * @see #solve(HexMesh, MaterialTable, NodeConstraints, double[], SolverConfig, ReferenceStateConfig, Progress)
     */
    public static ReferenceStateResult solve(HexMesh loaded, MaterialTable mats, NodeConstraints bc,
                                             double[] gravityMs2, SolverConfig cfg, ReferenceStateConfig rcfg,
                                             Progress progress, double[] startX, double[] startU) {
        long t0 = System.nanoTime();
        Progress prog = progress == null ? Progress.NONE : progress;
        HyperelasticSolver solver = new HyperelasticSolver(loaded, mats, bc, cfg);
        final double[] xObs = loaded.xyzMm();
        final int n = xObs.length;
        if (startX != null && startX.length != n || startU != null && startU.length != n) {
            throw new IllegalArgumentException("start positions and displacements need " + n + " values");
        }
        final int m = rcfg.andersonDepth();
        double[] x = startX == null ? xObs.clone() : startX.clone();   // current reference estimate X_k
        double[] u = startU == null ? null : startU.clone();           // last displacement (warm start)
        double[] f = new double[n];          // f_k = x_obs − φ(X_k)
        double[][] dX = new double[m][];
        double[][] dF = new double[m][];
        double[] xPrev = null;
        double[] fPrev = null;
        int hist = 0;
        int newton = 0;
        int linear = 0;
        double[] history = new double[rcfg.maxIterations()];
        double[] bestHistory = new double[rcfg.maxIterations()];
        double mismatch = Double.POSITIVE_INFINITY;
        double rmsPrev = Double.POSITIVE_INFINITY;
        double rmsBest = Double.POSITIVE_INFINITY;
        final double[] xBest = new double[n];
        final double[] fBest = new double[n];
        final double[] uBest = new double[n];
        double relax = 1;
        final int[] hex = loaded.hex();
        // element determinants for the local safeguard; not computed when it is off
        final int ne = rcfg.holdBack() ? hex.length / 8 : 0;
        final double[] detLoaded = new double[ne];
        final double[] detPrev = new double[ne];
        final double[] detWork = new double[ne];
        if (rcfg.holdBack()) {
            ReferenceGeometry.minGaussDet(xObs, hex, detLoaded);
        }
        int heldBack = 0;
        double fallbackTriedAt = Double.NaN;
        final boolean[] held = new boolean[n / 3];   // nodes held back in the current iterate
        for (int k = 0; k < rcfg.maxIterations(); k++) {
            prog.checkCancelled();
            SolveResult r;
            boolean loose = k == 0 || history[k - 1] > Math.min(LOOSE_FACTOR * rcfg.toleranceMm(), LOOSE_MAX_MM);
            if (loose) {
                solver.setTolerances(LOOSE_RESIDUAL, LOOSE_ENERGY);
            } else {
                solver.setTolerances(0, 0);
            }
            try {
                solver.moveReference(x);
                r = solver.solve(gravityMs2, Progress.NONE, u);
            } catch (InvertedElementException | SolverDivergedException ex) {
                relax *= 0.5;
                if (xPrev == null || relax < MIN_RELAXATION) {
                    throw new SolverDivergedException("reference-state iteration " + k
                            + ": forward solve failed: " + ex.getMessage(), Double.NaN, 0);
                }
                // fall back to a damped plain fixed-point step from the last solved iterate
                for (int i = 0; i < n; i++) {
                    x[i] = xPrev[i] + relax * fPrev[i];
                }
                if (rcfg.holdBack()) {
                    heldBack += holdBack(x, xPrev, hex, detLoaded, detPrev, detWork, held);
                }
                hist = 0;
                k--;
                continue;
            }
            newton += r.newtonIterations();
            linear += r.linearIterations();
            u = r.u();
            mismatch = mismatch(xObs, x, u, f);
            if (converged(f, mismatch, rcfg, held) && !solver.configuredTolerances()) {
                // accept only a forward solve at the configured tolerances
                solver.setTolerances(0, 0);
                r = solver.solve(gravityMs2, Progress.NONE, u);
                newton += r.newtonIterations();
                linear += r.linearIterations();
                u = r.u();
                mismatch = mismatch(xObs, x, u, f);
            }
            history[k] = mismatch;
            prog.update("reference state", (k + 1.0) / rcfg.maxIterations());
            if (converged(f, mismatch, rcfg, held)) {
                int heldNow = 0;
                for (boolean h : held) {
                    heldNow += h ? 1 : 0;
                }
                return new ReferenceStateResult(loaded.withNodes(x.clone()), u.clone(), k + 1, mismatch,
                        Arrays.copyOf(history, k + 1), newton, linear, (System.nanoTime() - t0) / 1_000_000,
                        "fixed-point (Anderson " + m + ")" + (heldBack == 0 ? ""
                                : "; " + heldBack + " node steps held back to keep elements from collapsing"), r,
                        heldNow, withinPercent(f, rcfg.toleranceMm()), false);
            }
            // Safeguard: Anderson mixing can go unstable on a strongly nonlinear map (the mismatch
            // then grows step after step). When the RMS mismatch grows, restart the mixing from the
            // current iterate with a halved relaxation (restarted Anderson; Walker & Ni 2011, §5).
            // If it has grown to RUNAWAY times the best so far, go back to the best iterate.
            double rms = VecOps.norm(f) / Math.sqrt(n / 3.0);
            if (rms < rmsBest) {
                rmsBest = rms;
                System.arraycopy(x, 0, xBest, 0, n);
                System.arraycopy(f, 0, fBest, 0, n);
                System.arraycopy(u, 0, uBest, 0, n);
            }
            bestHistory[k] = rmsBest;
            int w = rcfg.stallWindow();
            if (w > 0 && k >= w && rmsBest > (1 - ReferenceStateConfig.STALL_PROGRESS) * bestHistory[k - w]) {
                ReferenceStateResult fb = fallback(solver, loaded, xObs, xBest, uBest, gravityMs2, rcfg, k + 1,
                        history, newton, linear, t0, m, heldBack);
                if (fb != null) {
                    return fb;
                }
                throw new SolverDivergedException(String.format("reference-state iteration stalled: the RMS nodal "
                        + "mismatch (best %.4g mm, max %.4g mm) fell by less than %.0f %% in the last %d forward solves",
                        rmsBest, mismatch, 100 * ReferenceStateConfig.STALL_PROGRESS, w), Double.NaN, 1);
            }
            // Without a stall test, a stalled iteration whose best iterate already meets the fallback rule stops
            // there instead of spending the remaining forward solves; otherwise it goes on (tried once per best).
            if (w == 0 && rmsBest != fallbackTriedAt
                    && fallbackDue(bestHistory, k, ReferenceStateConfig.FALLBACK_STALL_WINDOW)
                    && fallbackAccepts(fBest, maxNorm(fBest), rcfg)) {
                fallbackTriedAt = rmsBest;
                ReferenceStateResult fb = fallback(solver, loaded, xObs, xBest, uBest, gravityMs2, rcfg, k + 1,
                        history, newton, linear, t0, m, heldBack);
                if (fb != null) {
                    return fb;
                }
            }
            boolean restart = rms > rmsPrev;
            if (rms > RUNAWAY * rmsBest) {
                System.arraycopy(xBest, 0, x, 0, n);
                System.arraycopy(fBest, 0, f, 0, n);
                u = uBest.clone();
                rms = rmsBest;
            }
            rmsPrev = rms;
            if (restart) {
                hist = 0;
                relax = Math.max(MIN_RELAXATION, 0.5 * relax);
            } else {
                // a step that reduced the mismatch lets the relaxation recover, so that a few hard
                // steps early on do not damp every later one (or exhaust the halvings)
                relax = Math.min(1, RELAXATION_RECOVERY * relax);
            }
            // Anderson type II: X_{k+1} = X_k + f_k − (ΔX + ΔF) γ, γ = argmin ‖f_k − ΔF γ‖
            if (m > 0 && xPrev != null && !restart) {
                double[] ddx = new double[n];
                double[] ddf = new double[n];
                for (int i = 0; i < n; i++) {
                    ddx[i] = x[i] - xPrev[i];
                    ddf[i] = f[i] - fPrev[i];
                }
                if (hist == m) {
                    System.arraycopy(dX, 1, dX, 0, m - 1);
                    System.arraycopy(dF, 1, dF, 0, m - 1);
                    hist--;
                }
                dX[hist] = ddx;
                dF[hist] = ddf;
                hist++;
            }
            if (xPrev == null) {
                xPrev = new double[n];
                fPrev = new double[n];
            }
            System.arraycopy(x, 0, xPrev, 0, n);
            System.arraycopy(f, 0, fPrev, 0, n);
            if (rcfg.holdBack()) {
                ReferenceGeometry.minGaussDet(xPrev, hex, detPrev);
            }
            // damped Anderson: X_{k+1} = X_k + β f_k − (ΔX + β ΔF) γ
            double[] gamma = hist > 0 ? leastSquares(dF, hist, f) : new double[0];
            for (int i = 0; i < n; i++) {
                double s = x[i] + relax * f[i];
                for (int j = 0; j < hist; j++) {
                    s -= gamma[j] * (dX[j][i] + relax * dF[j][i]);
                }
                x[i] = s;
            }
            if (rcfg.holdBack()) {
                heldBack += holdBack(x, xPrev, hex, detLoaded, detPrev, detWork, held);
            }
        }
        if (rmsBest < Double.POSITIVE_INFINITY) {
            ReferenceStateResult fb = fallback(solver, loaded, xObs, xBest, uBest, gravityMs2, rcfg,
                    rcfg.maxIterations(), history, newton, linear, t0, m, heldBack);
            if (fb != null) {
                return fb;
            }
        }
        throw new SolverDivergedException(String.format("reference-state iteration did not reach %.3g mm in %d"
                + " forward solves (last max nodal mismatch %.4g mm)", rcfg.toleranceMm(), rcfg.maxIterations(),
                mismatch), Double.NaN, 1);
    }

    /**
     * The fallback of the coarse rule ({@link ReferenceStateConfig#FALLBACK_PERCENTILE}): the best iterate,
     * solved again at the configured tolerances from its own displacement; returned when
     * {@link #fallbackAccepts} holds, else null (also when that solve fails).
     */
    private static ReferenceStateResult fallback(HyperelasticSolver solver, HexMesh loaded, double[] xObs,
                                                 double[] xBest, double[] uBest, double[] gravityMs2,
                                                 ReferenceStateConfig rcfg, int solves, double[] history, int newton,
                                                 int linear, long t0, int m, int heldBack) {
        if (rcfg.maxMismatchMm() <= rcfg.toleranceMm()) {
            return null;
        }
        SolveResult r;
        try {
            solver.setTolerances(0, 0);
            solver.moveReference(xBest);
            r = solver.solve(gravityMs2, Progress.NONE, uBest);
        } catch (InvertedElementException | SolverDivergedException ex) {
            return null;
        }
        double[] f = new double[xObs.length];
        double mismatch = mismatch(xObs, xBest, r.u(), f);
        if (!fallbackAccepts(f, mismatch, rcfg)) {
            return null;
        }
        return new ReferenceStateResult(loaded.withNodes(xBest.clone()), r.u().clone(), solves + 1, mismatch,
                Arrays.copyOf(history, Math.min(solves, history.length)), newton + r.newtonIterations(),
                linear + r.linearIterations(), (System.nanoTime() - t0) / 1_000_000,
                "fixed-point (Anderson " + m + "), best iterate by the fallback rule" + (heldBack == 0 ? ""
                        : "; " + heldBack + " node steps held back to keep elements from collapsing"), r, 0,
                withinPercent(f, rcfg.toleranceMm()), true);
    }

    /**
     * The fallback rule: every node within {@code maxMismatchMm} (no exception for held nodes) and at
     * least {@link ReferenceStateConfig#FALLBACK_PERCENTILE} % of the nodes within {@code toleranceMm};
     * never for the strict rule.
     */
    static boolean fallbackAccepts(double[] f, double maxMismatch, ReferenceStateConfig rcfg) {
        if (rcfg.maxMismatchMm() <= rcfg.toleranceMm() || !(maxMismatch <= rcfg.maxMismatchMm())) {
            return false;
        }
        return withinPercent(f, rcfg.toleranceMm()) >= ReferenceStateConfig.FALLBACK_PERCENTILE;
    }

    /**
     * True when the best RMS mismatch after forward solve {@code k} has fallen by less than
     * {@link ReferenceStateConfig#STALL_PROGRESS} over the last {@code window} solves.
     */
    static boolean fallbackDue(double[] bestHistory, int k, int window) {
        return window > 0 && k >= window
                && bestHistory[k] > (1 - ReferenceStateConfig.STALL_PROGRESS) * bestHistory[k - window];
    }

    /** max_n |f_n| (mm). */
    static double maxNorm(double[] f) {
        double m = 0;
        for (int i = 0; i < f.length; i += 3) {
            m = Math.max(m, Math.sqrt(f[i] * f[i] + f[i + 1] * f[i + 1] + f[i + 2] * f[i + 2]));
        }
        return m;
    }

    /** Share of nodes (percent) whose mismatch |f_n| is within {@code tolMm}. */
    static double withinPercent(double[] f, double tolMm) {
        int nodes = f.length / 3;
        int within = 0;
        for (int i = 0; i < f.length; i += 3) {
            if (Math.sqrt(f[i] * f[i] + f[i + 1] * f[i + 1] + f[i + 2] * f[i + 2]) <= tolMm) {
                within++;
            }
        }
        return nodes == 0 ? 100 : 100.0 * within / nodes;
    }

    /**
     * Local safeguard of a candidate reference {@code x} (stepped from the solved iterate
     * {@code xPrev}): while an element's smallest Gauss-point det(∂X/∂ξ) is below both
     * {@link #MIN_VOLUME_RATIO} × its loaded value and its value at {@code xPrev}, the steps of its
     * nodes are halved, and after {@link #HOLD_BACK_HALVINGS} halvings those nodes return to
     * {@code xPrev}. Terminates: an element whose nodes are all at {@code xPrev} has its value there,
     * so each round after the halvings returns at least one more node. Constrained nodes stay on
     * their constraint (a convex combination of two admissible positions).
     *
     * @param x         candidate reference, modified in place
     * @param xPrev     last solved reference iterate
     * @param hex       connectivity
     * @param detLoaded smallest det per element of the loaded mesh
     * @param detPrev   smallest det per element at {@code xPrev}
     * @param det       work array, one value per element
     * @param held      set to true for the nodes held back by this call, false for all others
     * @return number of node steps held back (counted once per call and node)
     */
    static int holdBack(double[] x, double[] xPrev, int[] hex, double[] detLoaded, double[] detPrev, double[] det,
                        boolean[] held) {
        int nodes = x.length / 3;
        Arrays.fill(held, false);
        int count = 0;
        for (int round = 0; ; round++) {
            ReferenceGeometry.minGaussDet(x, hex, det);
            boolean[] mark = null;
            for (int e = 0; e < det.length; e++) {
                if (det[e] < Math.min(MIN_VOLUME_RATIO * detLoaded[e], detPrev[e])) {
                    if (mark == null) {
                        mark = new boolean[nodes];
                    }
                    for (int a = 0; a < 8; a++) {
                        mark[hex[8 * e + a]] = true;
                    }
                }
            }
            if (mark == null) {
                return count;
            }
            double scale = round < HOLD_BACK_HALVINGS ? 0.5 : 0;
            for (int i = 0; i < nodes; i++) {
                if (mark[i]) {
                    if (!held[i]) {
                        held[i] = true;
                        count++;
                    }
                    for (int c = 3 * i; c < 3 * i + 3; c++) {
                        x[c] = xPrev[c] + scale * (x[c] - xPrev[c]);
                    }
                }
            }
        }
    }

    /**
     * The stopping rule: every node within the tolerance; or, when {@code maxMismatchMm} exceeds the
     * tolerance, the {@link ReferenceStateConfig#PERCENTILE}-th percentile within the tolerance and
     * every node within {@code maxMismatchMm}, except that nodes held back in this iterate
     * ({@code held}, may be null) may reach {@link #HELD_MISMATCH_FACTOR} times that bound.
     */
    static boolean converged(double[] f, double maxMismatch, ReferenceStateConfig rcfg, boolean[] held) {
        if (maxMismatch <= rcfg.toleranceMm()) {
            return true;
        }
        if (rcfg.maxMismatchMm() <= rcfg.toleranceMm()
                || maxMismatch > HELD_MISMATCH_FACTOR * rcfg.maxMismatchMm()) {
            return false;
        }
        int nodes = f.length / 3;
        int above = 0;
        for (int i = 0; i < f.length; i += 3) {
            double m = Math.sqrt(f[i] * f[i] + f[i + 1] * f[i + 1] + f[i + 2] * f[i + 2]);
            if (m > rcfg.toleranceMm()) {
                above++;
            }
            if (m > rcfg.maxMismatchMm() && (held == null || !held[i / 3])) {
                return false;
            }
        }
        return above <= nodes * (1 - ReferenceStateConfig.PERCENTILE / 100);
    }

    /** f = x_obs − (X + u); returns max_n |f_n| (mm). */
    private static double mismatch(double[] xObs, double[] x, double[] u, double[] f) {
        double mismatch = 0;
        for (int i = 0; i < xObs.length; i += 3) {
            double fx = xObs[i] - x[i] - u[i];
            double fy = xObs[i + 1] - x[i + 1] - u[i + 1];
            double fz = xObs[i + 2] - x[i + 2] - u[i + 2];
            f[i] = fx;
            f[i + 1] = fy;
            f[i + 2] = fz;
            mismatch = Math.max(mismatch, Math.sqrt(fx * fx + fy * fy + fz * fz));
        }
        return mismatch;
    }

    /**
     * Naive reference estimate by reversing gravity: X = x + u_(−g)(x). Biased except in linear
     * elasticity (Whiteley 2005); kept for comparison. The result's mismatch comes from one forward
     * solve of X under +g.
     */
    public static ReferenceStateResult reverseGravity(HexMesh loaded, MaterialTable mats, NodeConstraints bc,
                                                      double[] gravityMs2, SolverConfig cfg, Progress progress) {
        long t0 = System.nanoTime();
        HyperelasticSolver solver = new HyperelasticSolver(loaded, mats, bc, cfg);
        double[] minus = {-gravityMs2[0], -gravityMs2[1], -gravityMs2[2]};
        SolveResult back = solver.solve(minus, progress, null);
        double[] xObs = loaded.xyzMm();
        double[] x = xObs.clone();
        for (int i = 0; i < x.length; i++) {
            x[i] += back.u()[i];
        }
        solver.moveReference(x);
        SolveResult fwd = solver.solve(gravityMs2, progress, null);
        double mismatch = 0;
        for (int i = 0; i < x.length; i += 3) {
            double fx = xObs[i] - x[i] - fwd.u()[i];
            double fy = xObs[i + 1] - x[i + 1] - fwd.u()[i + 1];
            double fz = xObs[i + 2] - x[i + 2] - fwd.u()[i + 2];
            mismatch = Math.max(mismatch, Math.sqrt(fx * fx + fy * fy + fz * fz));
        }
        return new ReferenceStateResult(loaded.withNodes(x), fwd.u(), 0, mismatch, new double[] {mismatch},
                back.newtonIterations() + fwd.newtonIterations(), back.linearIterations() + fwd.linearIterations(),
                (System.nanoTime() - t0) / 1_000_000, "reverse gravity (biased)", fwd, 0, Double.NaN, false);
    }

    /** min ‖f − Σ γ_j dF_j‖ by normal equations with a tiny Tikhonov term (m ≤ 20 columns). */
    private static double[] leastSquares(double[][] dF, int h, double[] f) {
        double[] a = new double[h * h];
        double[] b = new double[h];
        for (int i = 0; i < h; i++) {
            for (int j = 0; j <= i; j++) {
                double s = VecOps.dot(dF[i], dF[j]);
                a[h * i + j] = s;
                a[h * j + i] = s;
            }
            b[i] = VecOps.dot(dF[i], f);
        }
        double maxDiag = 0;
        for (int i = 0; i < h; i++) {
            maxDiag = Math.max(maxDiag, a[h * i + i]);
        }
        // regularisation keeps the small system solvable when differences become collinear
        for (int i = 0; i < h; i++) {
            a[h * i + i] += 1e-10 * maxDiag + 1e-300;
        }
        DenseOps.cholesky(a, h);
        double[] g = new double[h];
        DenseOps.choleskySolve(a, h, b, g);
        return g;
    }
}
