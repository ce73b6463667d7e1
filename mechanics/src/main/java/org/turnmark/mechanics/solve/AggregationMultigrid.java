package org.turnmark.mechanics.solve;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

import org.turnmark.geom.Parallel;

/**
 * Smoothed-aggregation algebraic multigrid for elasticity (Vaněk, Mandel &amp; Brezina, Computing
 * 56, 1996), used as one symmetric V-cycle per conjugate-gradient iteration.
 *
 * <ul>
 *   <li>Aggregation: greedy on the block graph in node order (phase 1: a node whose neighbours
 *       are all free forms an aggregate with them; phase 2: leftovers join a neighbouring
 *       aggregate; phase 3: remaining nodes group with their free neighbours). Deterministic.</li>
 *   <li>Tentative prolongator: the six rigid-body modes of each aggregate about its centroid
 *       (translation, rotation), restricted to the aggregate's points; coarse levels carry six
 *       unknowns per point (block size 6).</li>
 *   <li>Prolongator smoothing P = (I − ω D⁻¹A) P₀, ω = 4/(3 λ_max(D⁻¹A)), coarse operator
 *       A_c = Pᵀ A P (Galerkin).</li>
 *   <li>Smoother: Chebyshev polynomial of degree {@value #CHEBYSHEV_DEGREE} in the block-Jacobi
 *       preconditioned operator on [λ_max/{@value #CHEBYSHEV_RATIO}, λ_max] (Adams et al.,
 *       J Comput Phys 188, 2003), the same before and after the coarse correction, so the V-cycle
 *       is symmetric positive definite; parallel and deterministic.</li>
 *   <li>Coarsest level (≤ {@value #COARSEST_MAX} unknowns): dense Cholesky.</li>
 *   <li>The finest level smooths and forms its residual with a single-precision copy Ã of the
 *       operator that stores only its upper block triangle ({@link UpperFloatMatrix}; about a
 *       quarter of the memory traffic of the double-precision product that dominates the cost).
 *       The cycle is
 *       then the symmetric V-cycle of Ã with the Galerkin coarse operator of A, still a symmetric
 *       positive definite preconditioner for the conjugate gradients on A (rounding each entry
 *       keeps Ã symmetric, and a relative perturbation of 1e−7 does not affect convergence).</li>
 * </ul>
 * {@link #refresh} keeps the hierarchy and only updates the finest-level smoother after the
 * matrix values change (within a Newton increment); the V-cycle remains SPD, only slightly less
 * effective. A diagonal shift σI added to the matrix (Levenberg–Marquardt regularisation of an
 * indefinite tangent) reaches the coarse levels exactly without new Galerkin products: with the
 * prolongators fixed, Pᵀ(A + σI)P = PᵀAP + σ PᵀP, so each coarse level keeps M = PᵀM_fP (M = I on
 * the finest level, computed once per hierarchy when a shift first changes) and adds the change of
 * σ times M. Not thread safe.
 */
final class AggregationMultigrid implements Preconditioner {

    static final int COARSEST_MAX = 300;
    static final int CHEBYSHEV_DEGREE = 2;
    static final double CHEBYSHEV_RATIO = 30;
    /** Power iterations for λ_max(D⁻¹A); the 1.1 safety factor covers their under-estimate. */
    static final int POWER_ITERATIONS = 12;
    /** Power iterations of a refresh, warm-started from the previous dominant vector. */
    static final int REFRESH_POWER_ITERATIONS = 4;
    static final double LAMBDA_SAFETY = 1.1;
    static final int MAX_LEVELS = 10;
    private static final int ROWS = 256;

    private final double[] finePos;
    private final List<Level> levels = new ArrayList<>();
    private double[] coarseFactor;
    /** Dominant-vector estimate of the finest level, kept across setups. */
    private double[] fineEig;
    /** Reused single-precision copy of the finest operator. */
    private UpperFloatMatrix fineFloat;
    private int coarseN;
    /** True once {@link #setup} completed (a failed setup leaves no usable hierarchy). */
    private boolean ready;
    /** Diagonal shift σ included in the coarse operators: they are Pᵀ(A₀ + σI)P. */
    private double coarseSigma;
    /** Whether the coarse levels carry their shift matrices M. */
    private boolean shiftMatrices;

    /** One level: operator, smoother, and the prolongator from the next coarser level. */
    private static final class Level {
        BlockCsr a;
        /** Single-precision copy of the finest operator for smoothing (null on coarse levels). */
        UpperFloatMatrix af;
        /**
         * Coarse levels: values of M = Pᵀ M_f P on this level's pattern (M_f = I on the finest level),
         * the change of this operator per unit of diagonal shift; null until a shift changes.
         */
        double[] m;
        /** Last power-iteration vector (dominant eigenvector estimate of D⁻¹A). */
        double[] eig;
        final BlockJacobi dinv = new BlockJacobi();
        double lmax;
        double[] pos;
        int nc;
        int bc;
        int[] pPtr;
        int[] pCol;
        double[] pVal;
        int[] tPtr;
        int[] tRow;
        int[] tIdx;
        /** Prolongator values in transpose order (entry q of the transpose walk at q·bf·bc). */
        double[] tVal;
        double[] rhs;
        double[] x;
        double[] r;
        double[] z;
        double[] d;
        double[] t;

        /** y = A x for smoothing and residuals: the single-precision copy where there is one. */
        void mul(double[] x, double[] y) {
            if (af != null) {
                af.multiply(x, y);
            } else {
                a.multiply(x, y);
            }
        }

        void allocate() {
            int n = a.size();
            rhs = new double[n];
            x = new double[n];
            r = new double[n];
            z = new double[n];
            d = new double[n];
            t = new double[n];
        }
    }

    AggregationMultigrid(double[] fineNodePositionsMm) {
        this.finePos = fineNodePositionsMm.clone();
    }

    @Override
    public void setup(BlockCsr a) {
        setup(a, 0);
    }

    /** Builds the hierarchy for a matrix that includes the diagonal shift {@code sigma}·I. */
    private void setup(BlockCsr a, double sigma) {
        ready = false;
        shiftMatrices = false;
        coarseSigma = sigma;
        levels.clear();
        Level l = new Level();
        l.a = a;
        l.pos = finePos;
        while (true) {
            l.allocate();
            boolean fine = levels.isEmpty();
            if (fine && l.a.b == 3) {
                if (fineFloat == null || fineFloat.source() != l.a) {
                    fineFloat = new UpperFloatMatrix(l.a);
                }
                fineFloat.refresh();
                l.af = fineFloat;
            }
            l.dinv.setup(l.a);
            if (fine && fineEig != null && fineEig.length == l.a.size()) {
                // the finest operator changed little since the last setup (next Newton increment)
                l.eig = fineEig;
                l.lmax = refreshLambdaMax(l);
            } else {
                l.lmax = estimateLambdaMax(l);
            }
            if (fine) {
                fineEig = l.eig;
            }
            levels.add(l);
            int n = l.a.size();
            if (n <= COARSEST_MAX || levels.size() == MAX_LEVELS) {
                break;
            }
            int[] agg = new int[l.a.rows];
            int nAgg = aggregate(l.a, agg);
            if (6 * nAgg >= n) {
                break; // no coarsening possible; the last level is factorised densely
            }
            Level c = new Level();
            c.pos = centroids(l.pos, agg, nAgg);
            buildProlongator(l, agg, nAgg, c.pos);
            c.a = galerkin(l, l.a);
            regularize(c.a);
            l = c;
        }
        Level last = levels.get(levels.size() - 1);
        coarseN = last.a.size();
        if (coarseN > 6000) {
            throw new LinearSolveException("multigrid coarsest level too large for a dense factorisation: " + coarseN);
        }
        coarseFactor = dense(last.a);
        DenseOps.cholesky(coarseFactor, coarseN);
        ready = true;
    }

    @Override
    public void refresh(BlockCsr a) {
        refresh(a, coarseSigma);
    }

    @Override
    public void refresh(BlockCsr a, double sigma) {
        if (!ready || levels.isEmpty() || levels.get(0).a != a || levels.size() == 1) {
            setup(a, sigma);
            return;
        }
        Level l = levels.get(0);
        if (l.af != null) {
            l.af.refresh();
        }
        l.dinv.setup(a);
        l.lmax = refreshLambdaMax(l);
        if (sigma != coarseSigma) {
            shiftCoarse(sigma - coarseSigma);
            coarseSigma = sigma;
        }
    }

    /** Adds ds·M to every coarse operator and refreshes its smoother and the coarse factor. */
    private void shiftCoarse(double ds) {
        ready = false;
        if (!shiftMatrices) {
            buildShiftMatrices();
        }
        for (int li = 1; li < levels.size(); li++) {
            Level l = levels.get(li);
            double[] v = l.a.val;
            double[] m = l.m;
            for (int i = 0; i < v.length; i++) {
                v[i] += ds * m[i];
            }
            l.dinv.setup(l.a);
            l.lmax = refreshLambdaMax(l);
        }
        Level last = levels.get(levels.size() - 1);
        coarseFactor = dense(last.a);
        DenseOps.cholesky(coarseFactor, coarseN);
        ready = true;
    }

    /**
     * M on each coarse level: PᵀP below the finest level, then PᵀMP level by level (the Galerkin
     * product of the level above's M, whose pattern is that level's operator pattern, so the result
     * lands on this level's pattern position by position).
     */
    private void buildShiftMatrices() {
        Level fine = levels.get(0);
        BlockCsr id = new BlockCsr(fine.a.rows, fine.a.b, fine.a.rowPtr, fine.a.col);
        int bb = fine.a.b * fine.a.b;
        for (int r = 0; r < id.rows; r++) {
            for (int i = 0; i < fine.a.b; i++) {
                id.val[bb * id.diag[r] + (fine.a.b + 1) * i] = 1;
            }
        }
        BlockCsr above = id;
        for (int li = 0; li + 1 < levels.size(); li++) {
            Level l = levels.get(li);
            BlockCsr mc = galerkin(l, above);
            Level c = levels.get(li + 1);
            if (mc.val.length != c.a.val.length) {
                throw new IllegalStateException("shift matrix pattern differs from the coarse operator's");
            }
            c.m = mc.val;
            above = mc;
        }
        shiftMatrices = true;
    }

    int levelCount() {
        return levels.size();
    }

    @Override
    public UpperFloatMatrix singlePrecision(BlockCsr a) {
        return ready && !levels.isEmpty() && levels.get(0).a == a ? levels.get(0).af : null;
    }

    /** Operator of level li (0 = finest); for tests. */
    BlockCsr operator(int li) {
        return levels.get(li).a;
    }

    /** x += P xc with the prolongator from level li + 1 to level li; for tests. */
    void prolongateAdd(int li, double[] xc, double[] x) {
        prolongAdd(levels.get(li), xc, x);
    }

    /** Level sizes (block rows, block size, stored blocks), for diagnostics. */
    String describe() {
        StringBuilder sb = new StringBuilder();
        for (Level l : levels) {
            sb.append(l.a.rows).append('x').append(l.a.b).append(" nnzb=").append(l.a.col.length)
                    .append(" lmax=").append(String.format("%.3g", l.lmax)).append("; ");
        }
        return sb.toString();
    }

    @Override
    public void apply(double[] r, double[] z) {
        vcycle(0, r, z);
    }

    private void vcycle(int li, double[] b, double[] x) {
        Level l = levels.get(li);
        if (li == levels.size() - 1) {
            DenseOps.choleskySolve(coarseFactor, coarseN, b, x);
            return;
        }
        chebyshev(l, b, x, true);
        l.mul(x, l.t);
        for (int i = 0; i < b.length; i++) {
            l.r[i] = b[i] - l.t[i];
        }
        Level c = levels.get(li + 1);
        restrict(l, l.r, c.rhs);
        vcycle(li + 1, c.rhs, c.x);
        prolongAdd(l, c.x, x);
        chebyshev(l, b, x, false);
    }

    /** Chebyshev smoothing of A x = b (Saad, Iterative Methods, Alg. 12.1 with preconditioner D⁻¹). */
    private static void chebyshev(Level l, double[] b, double[] x, boolean zeroStart) {
        int n = b.length;
        double lmax = l.lmax;
        double lmin = lmax / CHEBYSHEV_RATIO;
        double theta = 0.5 * (lmax + lmin);
        double delta = 0.5 * (lmax - lmin);
        if (zeroStart) {
            System.arraycopy(b, 0, l.r, 0, n);
            Arrays.fill(x, 0);
        } else {
            l.mul(x, l.t);
            for (int i = 0; i < n; i++) {
                l.r[i] = b[i] - l.t[i];
            }
        }
        l.dinv.apply(l.r, l.z);
        double sigma = theta / delta;
        double rho = 1 / sigma;
        for (int i = 0; i < n; i++) {
            l.d[i] = l.z[i] / theta;
        }
        for (int k = 0; k < CHEBYSHEV_DEGREE; k++) {
            for (int i = 0; i < n; i++) {
                x[i] += l.d[i];
            }
            if (k == CHEBYSHEV_DEGREE - 1) {
                break;
            }
            l.mul(l.d, l.t);
            for (int i = 0; i < n; i++) {
                l.r[i] -= l.t[i];
            }
            l.dinv.apply(l.r, l.z);
            double rhoNew = 1 / (2 * sigma - rho);
            double c1 = rhoNew * rho;
            double c2 = 2 * rhoNew / delta;
            for (int i = 0; i < n; i++) {
                l.d[i] = c1 * l.d[i] + c2 * l.z[i];
            }
            rho = rhoNew;
        }
    }

    /**
     * λ_max(D⁻¹A) after a small change of A: {@value #REFRESH_POWER_ITERATIONS} power iterations
     * started from the dominant vector of the previous estimate, which is already close to the new
     * one, instead of {@value #POWER_ITERATIONS} from a fixed start vector.
     */
    private static double refreshLambdaMax(Level l) {
        if (l.eig == null) {
            return estimateLambdaMax(l);
        }
        System.arraycopy(l.eig, 0, l.x, 0, l.eig.length);
        return powerIterations(l, REFRESH_POWER_ITERATIONS);
    }

    private static double estimateLambdaMax(Level l) {
        int n = l.a.size();
        double[] v = l.x;
        // deterministic start vector (a fixed-seed linear congruential sequence)
        long s = 0x9E3779B97F4A7C15L;
        for (int i = 0; i < n; i++) {
            s = s * 6364136223846793005L + 1442695040888963407L;
            v[i] = ((s >>> 11) * 0x1.0p-53) - 0.5;
        }
        return powerIterations(l, POWER_ITERATIONS);
    }

    /** Power iterations on D⁻¹A from l.x; keeps the last vector in l.eig; returns the safe bound. */
    private static double powerIterations(Level l, int iterations) {
        int n = l.a.size();
        double[] v = l.x;
        double lambda = 0;
        for (int it = 0; it < iterations; it++) {
            double vn = VecOps.norm(v);
            for (int i = 0; i < n; i++) {
                v[i] /= vn;
            }
            l.mul(v, l.t);
            l.dinv.apply(l.t, l.z);
            lambda = VecOps.norm(l.z);
            System.arraycopy(l.z, 0, v, 0, n);
        }
        if (l.eig == null || l.eig.length != n) {
            l.eig = new double[n];
        }
        System.arraycopy(v, 0, l.eig, 0, n);
        return LAMBDA_SAFETY * lambda;
    }

    /** Greedy aggregation; returns the aggregate count, agg[i] in [0, count). */
    static int aggregate(BlockCsr a, int[] agg) {
        int n = a.rows;
        Arrays.fill(agg, -1);
        int count = 0;
        for (int i = 0; i < n; i++) {
            if (agg[i] >= 0) {
                continue;
            }
            boolean free = true;
            for (int k = a.rowPtr[i]; k < a.rowPtr[i + 1] && free; k++) {
                free = agg[a.col[k]] < 0;
            }
            if (free) {
                for (int k = a.rowPtr[i]; k < a.rowPtr[i + 1]; k++) {
                    agg[a.col[k]] = count;
                }
                count++;
            }
        }
        int[] phase1 = agg.clone();
        for (int i = 0; i < n; i++) {
            if (phase1[i] >= 0) {
                continue;
            }
            for (int k = a.rowPtr[i]; k < a.rowPtr[i + 1]; k++) {
                if (phase1[a.col[k]] >= 0) {
                    agg[i] = phase1[a.col[k]];
                    break;
                }
            }
        }
        for (int i = 0; i < n; i++) {
            if (agg[i] >= 0) {
                continue;
            }
            for (int k = a.rowPtr[i]; k < a.rowPtr[i + 1]; k++) {
                if (agg[a.col[k]] < 0) {
                    agg[a.col[k]] = count;
                }
            }
            agg[i] = count;
            count++;
        }
        return count;
    }

    private static double[] centroids(double[] pos, int[] agg, int nAgg) {
        double[] c = new double[3 * nAgg];
        int[] cnt = new int[nAgg];
        for (int i = 0; i < agg.length; i++) {
            int g = agg[i];
            c[3 * g] += pos[3 * i];
            c[3 * g + 1] += pos[3 * i + 1];
            c[3 * g + 2] += pos[3 * i + 2];
            cnt[g]++;
        }
        for (int g = 0; g < nAgg; g++) {
            c[3 * g] /= cnt[g];
            c[3 * g + 1] /= cnt[g];
            c[3 * g + 2] /= cnt[g];
        }
        return c;
    }

    /** Rigid-mode block (bf × 6) of point p relative to centroid c, row-major into out. */
    private static void tentative(int bf, double[] pos, int p, double[] cpos, int g, double[] out) {
        Arrays.fill(out, 0, 6 * bf, 0);
        double dx = pos[3 * p] - cpos[3 * g];
        double dy = pos[3 * p + 1] - cpos[3 * g + 1];
        double dz = pos[3 * p + 2] - cpos[3 * g + 2];
        // translation part: t + ω × d
        out[0] = 1;
        out[4] = dz;
        out[5] = -dy;
        out[7] = 1;
        out[9] = -dz;
        out[11] = dx;
        out[14] = 1;
        out[15] = dy;
        out[16] = -dx;
        if (bf == 6) {
            // translation coefficients of a coarse point already refer to its own centroid, the
            // rotation coefficients carry over unchanged
            out[21] = 1;
            out[28] = 1;
            out[35] = 1;
        }
    }

    private void buildProlongator(Level l, int[] agg, int nAgg, double[] cpos) {
        BlockCsr a = l.a;
        final int bf = a.b;
        final int bc = 6;
        final int fb = bf * bc;
        final int n = a.rows;
        final double omega = 4.0 / (3.0 * l.lmax);
        int[][] cols = new int[n][];
        double[][] vals = new double[n][];
        Parallel.forEachBlock(Parallel.blockCount(n, ROWS), 500L * n, blk -> {
            int from = blk * ROWS;
            int to = Math.min(n, from + ROWS);
            double[] acc = new double[nAgg * fb];
            int[] mark = new int[nAgg];
            Arrays.fill(mark, -1);
            int[] list = new int[64];
            double[] bm = new double[fb];
            double[] da = new double[bf * bf];
            double[] dinv = l.dinv.inv;
            for (int i = from; i < to; i++) {
                int cnt = 0;
                for (int k = a.rowPtr[i]; k < a.rowPtr[i + 1]; k++) {
                    int m = a.col[k];
                    int g = agg[m];
                    if (mark[g] != i) {
                        mark[g] = i;
                        if (cnt == list.length) {
                            list = Arrays.copyOf(list, 2 * cnt);
                        }
                        list[cnt++] = g;
                        Arrays.fill(acc, g * fb, g * fb + fb, 0);
                    }
                    // da = −ω D_i⁻¹ A_im
                    int v = bf * bf * k;
                    int di = bf * bf * i;
                    for (int r = 0; r < bf; r++) {
                        for (int c = 0; c < bf; c++) {
                            double s = 0;
                            for (int q = 0; q < bf; q++) {
                                s += dinv[di + bf * r + q] * a.val[v + bf * q + c];
                            }
                            da[bf * r + c] = -omega * s;
                        }
                    }
                    tentative(bf, l.pos, m, cpos, g, bm);
                    int o = g * fb;
                    for (int r = 0; r < bf; r++) {
                        for (int c = 0; c < bc; c++) {
                            double s = 0;
                            for (int q = 0; q < bf; q++) {
                                s += da[bf * r + q] * bm[bc * q + c];
                            }
                            acc[o + bc * r + c] += s;
                        }
                    }
                }
                int g = agg[i];
                tentative(bf, l.pos, i, cpos, g, bm);
                for (int q = 0; q < fb; q++) {
                    acc[g * fb + q] += bm[q];
                }
                int[] cs = Arrays.copyOf(list, cnt);
                Arrays.sort(cs);
                double[] vs = new double[cnt * fb];
                for (int q = 0; q < cnt; q++) {
                    System.arraycopy(acc, cs[q] * fb, vs, q * fb, fb);
                }
                cols[i] = cs;
                vals[i] = vs;
            }
        });
        l.nc = nAgg;
        l.bc = bc;
        l.pPtr = new int[n + 1];
        for (int i = 0; i < n; i++) {
            l.pPtr[i + 1] = l.pPtr[i] + cols[i].length;
        }
        int nnz = l.pPtr[n];
        l.pCol = new int[nnz];
        l.pVal = new double[nnz * fb];
        for (int i = 0; i < n; i++) {
            System.arraycopy(cols[i], 0, l.pCol, l.pPtr[i], cols[i].length);
            System.arraycopy(vals[i], 0, l.pVal, l.pPtr[i] * fb, vals[i].length);
        }
        // transpose structure: for each coarse column, the fine rows (ascending) and entry index
        l.tPtr = new int[nAgg + 1];
        for (int k = 0; k < nnz; k++) {
            l.tPtr[l.pCol[k] + 1]++;
        }
        for (int g = 0; g < nAgg; g++) {
            l.tPtr[g + 1] += l.tPtr[g];
        }
        l.tRow = new int[nnz];
        l.tIdx = new int[nnz];
        int[] fill = Arrays.copyOf(l.tPtr, nAgg);
        for (int i = 0; i < n; i++) {
            for (int k = l.pPtr[i]; k < l.pPtr[i + 1]; k++) {
                int q = fill[l.pCol[k]]++;
                l.tRow[q] = i;
                l.tIdx[q] = k;
            }
        }
        l.tVal = new double[nnz * fb];
        for (int q = 0; q < nnz; q++) {
            System.arraycopy(l.pVal, l.tIdx[q] * fb, l.tVal, q * fb, fb);
        }
    }

    /** A_c = Pᵀ (A P) with the prolongator of level l; the pattern depends only on a's pattern and P. */
    private static BlockCsr galerkin(Level l, BlockCsr a) {
        final int bf = a.b;
        final int bc = l.bc;
        final int fb = bf * bc;
        final int cb = bc * bc;
        final int n = a.rows;
        final int nc = l.nc;
        // AP, row by row
        int[][] apCols = new int[n][];
        double[][] apVals = new double[n][];
        Parallel.forEachBlock(Parallel.blockCount(n, ROWS), 2000L * n, blk -> {
            int from = blk * ROWS;
            int to = Math.min(n, from + ROWS);
            double[] acc = new double[nc * fb];
            int[] mark = new int[nc];
            Arrays.fill(mark, -1);
            int[] list = new int[128];
            for (int i = from; i < to; i++) {
                int cnt = 0;
                for (int k = a.rowPtr[i]; k < a.rowPtr[i + 1]; k++) {
                    int m = a.col[k];
                    int v = bf * bf * k;
                    for (int q = l.pPtr[m]; q < l.pPtr[m + 1]; q++) {
                        int g = l.pCol[q];
                        if (mark[g] != i) {
                            mark[g] = i;
                            if (cnt == list.length) {
                                list = Arrays.copyOf(list, 2 * cnt);
                            }
                            list[cnt++] = g;
                            Arrays.fill(acc, g * fb, g * fb + fb, 0);
                        }
                        int pv = q * fb;
                        int o = g * fb;
                        for (int r = 0; r < bf; r++) {
                            for (int s2 = 0; s2 < bf; s2++) {
                                double av = a.val[v + bf * r + s2];
                                if (av == 0) {
                                    continue;
                                }
                                int pr = pv + bc * s2;
                                int orow = o + bc * r;
                                for (int c = 0; c < bc; c++) {
                                    acc[orow + c] += av * l.pVal[pr + c];
                                }
                            }
                        }
                    }
                }
                int[] cs = Arrays.copyOf(list, cnt);
                Arrays.sort(cs);
                double[] vs = new double[cnt * fb];
                for (int q = 0; q < cnt; q++) {
                    System.arraycopy(acc, cs[q] * fb, vs, q * fb, fb);
                }
                apCols[i] = cs;
                apVals[i] = vs;
            }
        });
        // Pᵀ (AP), coarse row by coarse row
        int[][] cCols = new int[nc][];
        double[][] cVals = new double[nc][];
        Parallel.forEachBlock(Parallel.blockCount(nc, 64), 20000L * nc, blk -> {
            int from = blk * 64;
            int to = Math.min(nc, from + 64);
            double[] acc = new double[nc * cb];
            int[] mark = new int[nc];
            Arrays.fill(mark, -1);
            int[] list = new int[256];
            for (int gi = from; gi < to; gi++) {
                int cnt = 0;
                for (int t = l.tPtr[gi]; t < l.tPtr[gi + 1]; t++) {
                    int i = l.tRow[t];
                    int pv = l.tIdx[t] * fb;
                    int[] cs = apCols[i];
                    double[] vs = apVals[i];
                    for (int q = 0; q < cs.length; q++) {
                        int gj = cs[q];
                        if (mark[gj] != gi) {
                            mark[gj] = gi;
                            if (cnt == list.length) {
                                list = Arrays.copyOf(list, 2 * cnt);
                            }
                            list[cnt++] = gj;
                            Arrays.fill(acc, gj * cb, gj * cb + cb, 0);
                        }
                        int o = gj * cb;
                        int av = q * fb;
                        // acc(r, c) += Σ_s P(s, r) AP(s, c)
                        for (int s2 = 0; s2 < bf; s2++) {
                            for (int r = 0; r < bc; r++) {
                                double pvv = l.pVal[pv + bc * s2 + r];
                                if (pvv == 0) {
                                    continue;
                                }
                                int orow = o + bc * r;
                                int arow = av + bc * s2;
                                for (int c = 0; c < bc; c++) {
                                    acc[orow + c] += pvv * vs[arow + c];
                                }
                            }
                        }
                    }
                }
                int[] cs = Arrays.copyOf(list, cnt);
                Arrays.sort(cs);
                double[] vs = new double[cnt * cb];
                for (int q = 0; q < cnt; q++) {
                    System.arraycopy(acc, cs[q] * cb, vs, q * cb, cb);
                }
                cCols[gi] = cs;
                cVals[gi] = vs;
            }
        });
        int[] rowPtr = new int[nc + 1];
        for (int g = 0; g < nc; g++) {
            rowPtr[g + 1] = rowPtr[g] + cCols[g].length;
        }
        int[] col = new int[rowPtr[nc]];
        for (int g = 0; g < nc; g++) {
            System.arraycopy(cCols[g], 0, col, rowPtr[g], cCols[g].length);
        }
        BlockCsr c = new BlockCsr(nc, bc, rowPtr, col);
        for (int g = 0; g < nc; g++) {
            System.arraycopy(cVals[g], 0, c.val, rowPtr[g] * cb, cVals[g].length);
        }
        return c;
    }

    /**
     * Adds a small multiple of the identity to coarse diagonal blocks that are (numerically)
     * singular, which happens when an aggregate's points cannot carry all six rigid modes (e.g. two
     * points); the V-cycle stays SPD.
     */
    private static void regularize(BlockCsr c) {
        int b = c.b;
        int bb = b * b;
        double[] m = new double[bb];
        double[] out = new double[bb];
        for (int r = 0; r < c.rows; r++) {
            int d = bb * c.diag[r];
            double maxDiag = 0;
            for (int i = 0; i < b; i++) {
                maxDiag = Math.max(maxDiag, c.val[d + (b + 1) * i]);
            }
            System.arraycopy(c.val, d, m, 0, bb);
            for (int i = 0; i < b; i++) {
                m[(b + 1) * i] -= 1e-10 * maxDiag;
            }
            try {
                DenseOps.invertSpd(m, b, out, 0, r);
            } catch (LinearSolveException e) {
                double shift = 1e-6 * (maxDiag > 0 ? maxDiag : 1);
                for (int i = 0; i < b; i++) {
                    c.val[d + (b + 1) * i] += shift;
                }
            }
        }
    }

    /**
     * rc = Pᵀ r, walking the transpose so each coarse row is accumulated in registers; the
     * summation order (fine rows ascending, then fine components) is fixed.
     */
    private static void restrict(Level l, double[] r, double[] rc) {
        final int bf = l.a.b;
        final int bc = l.bc;
        final int fb = bf * bc;
        final int[] tPtr = l.tPtr;
        final int[] tRow = l.tRow;
        final double[] tVal = l.tVal;
        final int nc = l.nc;
        Parallel.forEachBlock(Parallel.blockCount(nc, ROWS), (long) tRow.length * fb, blk -> {
            int to = Math.min(nc, (blk + 1) * ROWS);
            if (bc == 6) {
                for (int g = blk * ROWS; g < to; g++) {
                    double c0 = 0, c1 = 0, c2 = 0, c3 = 0, c4 = 0, c5 = 0;
                    for (int t = tPtr[g], end = tPtr[g + 1]; t < end; t++) {
                        int ri0 = bf * tRow[t];
                        int pv = t * fb;
                        for (int s = 0; s < bf; s++, pv += 6) {
                            double ri = r[ri0 + s];
                            c0 += tVal[pv] * ri;
                            c1 += tVal[pv + 1] * ri;
                            c2 += tVal[pv + 2] * ri;
                            c3 += tVal[pv + 3] * ri;
                            c4 += tVal[pv + 4] * ri;
                            c5 += tVal[pv + 5] * ri;
                        }
                    }
                    int o = 6 * g;
                    rc[o] = c0;
                    rc[o + 1] = c1;
                    rc[o + 2] = c2;
                    rc[o + 3] = c3;
                    rc[o + 4] = c4;
                    rc[o + 5] = c5;
                }
                return;
            }
            for (int g = blk * ROWS; g < to; g++) {
                for (int c = 0; c < bc; c++) {
                    rc[bc * g + c] = 0;
                }
                for (int t = tPtr[g]; t < tPtr[g + 1]; t++) {
                    int i = tRow[t];
                    int pv = t * fb;
                    for (int s = 0; s < bf; s++) {
                        double ri = r[bf * i + s];
                        for (int c = 0; c < bc; c++) {
                            rc[bc * g + c] += tVal[pv + bc * s + c] * ri;
                        }
                    }
                }
            }
        });
    }

    /** x += P xc; each fine entry accumulates its coarse contributions in stored order. */
    private static void prolongAdd(Level l, double[] xc, double[] x) {
        final int bf = l.a.b;
        final int bc = l.bc;
        final int fb = bf * bc;
        final int n = l.a.rows;
        final int[] pPtr = l.pPtr;
        final int[] pCol = l.pCol;
        final double[] pVal = l.pVal;
        Parallel.forEachBlock(Parallel.blockCount(n, ROWS), (long) pCol.length * fb, blk -> {
            int to = Math.min(n, (blk + 1) * ROWS);
            if (bc == 6 && bf == 3) {
                for (int i = blk * ROWS; i < to; i++) {
                    double x0 = x[3 * i], x1 = x[3 * i + 1], x2 = x[3 * i + 2];
                    for (int k = pPtr[i], end = pPtr[i + 1]; k < end; k++) {
                        int g = 6 * pCol[k];
                        int pv = k * 18;
                        double y0 = xc[g], y1 = xc[g + 1], y2 = xc[g + 2];
                        double y3 = xc[g + 3], y4 = xc[g + 4], y5 = xc[g + 5];
                        x0 += pVal[pv] * y0 + pVal[pv + 1] * y1 + pVal[pv + 2] * y2
                                + pVal[pv + 3] * y3 + pVal[pv + 4] * y4 + pVal[pv + 5] * y5;
                        x1 += pVal[pv + 6] * y0 + pVal[pv + 7] * y1 + pVal[pv + 8] * y2
                                + pVal[pv + 9] * y3 + pVal[pv + 10] * y4 + pVal[pv + 11] * y5;
                        x2 += pVal[pv + 12] * y0 + pVal[pv + 13] * y1 + pVal[pv + 14] * y2
                                + pVal[pv + 15] * y3 + pVal[pv + 16] * y4 + pVal[pv + 17] * y5;
                    }
                    x[3 * i] = x0;
                    x[3 * i + 1] = x1;
                    x[3 * i + 2] = x2;
                }
                return;
            }
            for (int i = blk * ROWS; i < to; i++) {
                for (int k = pPtr[i]; k < pPtr[i + 1]; k++) {
                    int g = pCol[k];
                    int pv = k * fb;
                    for (int s = 0; s < bf; s++) {
                        double sum = 0;
                        for (int c = 0; c < bc; c++) {
                            sum += pVal[pv + bc * s + c] * xc[bc * g + c];
                        }
                        x[bf * i + s] += sum;
                    }
                }
            }
        });
    }

    private static double[] dense(BlockCsr a) {
        int n = a.size();
        int b = a.b;
        double[] m = new double[n * n];
        for (int r = 0; r < a.rows; r++) {
            for (int k = a.rowPtr[r]; k < a.rowPtr[r + 1]; k++) {
                int c = a.col[k];
                for (int i = 0; i < b; i++) {
                    for (int j = 0; j < b; j++) {
                        m[n * (b * r + i) + b * c + j] = a.val[b * b * k + b * i + j];
                    }
                }
            }
        }
        return m;
    }
}
