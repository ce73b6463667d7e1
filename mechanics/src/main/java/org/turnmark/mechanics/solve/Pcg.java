package org.turnmark.mechanics.solve;

import org.turnmark.geom.Parallel;

/**
 * Preconditioned conjugate gradients (Hestenes &amp; Stiefel 1952) for a symmetric positive definite
 * {@link BlockCsr}. Stops when ‖b − A x‖₂ ≤ tol·‖b‖₂. Keeps its work vectors between calls; not
 * thread safe.
 *
 * <p>When the preconditioner keeps a single-precision copy Ã of A (the multigrid does, for its
 * smoother: {@link UpperFloatMatrix}, about a quarter of the bytes of the double-precision product)
 * and the tolerance is at least {@value #SINGLE_MIN_TOL}, the iteration's products use Ã. The recurrences then track
 * b − Ã x, so convergence is confirmed with the true residual b − A x in double precision; if that
 * is still above the tolerance the residual is replaced by it and the iteration restarts from x
 * (iterative refinement: each restart multiplies the error by about ‖(A − Ã) A⁻¹‖ ≈ 1e−7 κ(A)). A
 * restart that does not halve the true residual switches to double-precision products.
 */
final class Pcg {

    /**
     * Smallest relative tolerance solved with single-precision products. Entries rounded to float
     * (relative error ≤ 6e−8) perturb the residual by up to about 6e−8·κ(A) relative; the Newton
     * solves ask for 1e−2 … 1e−7, where the first true-residual check almost always passes, while
     * tighter tolerances (tests, 1e−12) would need a restart per decade and run in double.
     */
    static final double SINGLE_MIN_TOL = 1e-8;

    private double[] r = new double[0];
    private double[] z = new double[0];
    private double[] p = new double[0];
    private double[] q = new double[0];

    /**
     * Solves A x = b from x = 0.
     *
     * @return iterations used (products with A or Ã inside the iteration; the double-precision
     *         residual checks are not counted)
     * @throws LinearSolveException on non-convergence or loss of positive definiteness
     */
    int solve(BlockCsr a, Preconditioner m, double[] b, double[] x, double tol, int maxIter) {
        int n = b.length;
        if (r.length != n) {
            r = new double[n];
            z = new double[n];
            p = new double[n];
            q = new double[n];
        }
        java.util.Arrays.fill(x, 0);
        System.arraycopy(b, 0, r, 0, n);
        double bnorm = VecOps.norm(b);
        if (bnorm == 0) {
            return 0;
        }
        UpperFloatMatrix af = tol >= SINGLE_MIN_TOL ? m.singlePrecision(a) : null;
        double stop = tol * bnorm;
        double trueResidual = bnorm;
        m.apply(r, z);
        System.arraycopy(z, 0, p, 0, n);
        double rz = VecOps.dot(r, z);
        for (int it = 1; it <= maxIter; it++) {
            if (af != null) {
                af.multiply(p, q);
            } else {
                a.multiply(p, q);
            }
            double pq = VecOps.dot(p, q);
            if (!(pq > 0)) {
                throw new LinearSolveException("conjugate gradients met non-positive curvature " + pq
                        + " at iteration " + it + " (tangent not positive definite)", true);
            }
            double alpha = rz / pq;
            axpy2(alpha, p, q, x, r);
            double rn = VecOps.norm(r);
            if (!Double.isFinite(rn)) {
                throw new LinearSolveException("conjugate gradients produced a non-finite residual at iteration " + it);
            }
            if (rn <= stop) {
                if (af == null) {
                    return it;
                }
                // confirm with the true residual in double precision
                a.multiply(x, q);
                for (int i = 0; i < n; i++) {
                    r[i] = b[i] - q[i];
                }
                rn = VecOps.norm(r);
                if (rn <= stop) {
                    return it;
                }
                if (!(rn < 0.5 * trueResidual)) {
                    af = null;   // refinement does not contract here: continue in double
                }
                trueResidual = rn;
                // restart the recurrences from the replaced residual
                m.apply(r, z);
                System.arraycopy(z, 0, p, 0, n);
                rz = VecOps.dot(r, z);
                continue;
            }
            m.apply(r, z);
            double rzNew = VecOps.dot(r, z);
            double beta = rzNew / rz;
            rz = rzNew;
            xpby(z, beta, p);
        }
        throw new LinearSolveException("conjugate gradients did not reach relative residual " + tol + " in "
                + maxIter + " iterations");
    }

    /** x += α p, r −= α q. */
    private static void axpy2(double alpha, double[] p, double[] q, double[] x, double[] r) {
        int n = x.length;
        Parallel.forEachBlock(Parallel.blockCount(n, VecOps.BLOCK), n, blk -> {
            int to = Math.min(n, (blk + 1) * VecOps.BLOCK);
            for (int i = blk * VecOps.BLOCK; i < to; i++) {
                x[i] += alpha * p[i];
                r[i] -= alpha * q[i];
            }
        });
    }

    /** p = z + β p. */
    private static void xpby(double[] z, double beta, double[] p) {
        int n = p.length;
        Parallel.forEachBlock(Parallel.blockCount(n, VecOps.BLOCK), n, blk -> {
            int to = Math.min(n, (blk + 1) * VecOps.BLOCK);
            for (int i = blk * VecOps.BLOCK; i < to; i++) {
                p[i] = z[i] + beta * p[i];
            }
        });
    }
}
