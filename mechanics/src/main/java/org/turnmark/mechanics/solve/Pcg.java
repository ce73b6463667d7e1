package org.turnmark.mechanics.solve;

import org.turnmark.geom.Parallel;

/**
 * Preconditioned conjugate gradients (Hestenes &amp; Stiefel 1952) for a symmetric positive definite
 * {@link BlockCsr}. Stops when ‖b − A x‖₂ ≤ tol·‖b‖₂. Keeps its work vectors between calls; not
 * thread safe.
 */
final class Pcg {

    private double[] r = new double[0];
    private double[] z = new double[0];
    private double[] p = new double[0];
    private double[] q = new double[0];

    /**
     * Solves A x = b from x = 0.
     *
     * @return iterations used
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
        double stop = tol * bnorm;
        m.apply(r, z);
        System.arraycopy(z, 0, p, 0, n);
        double rz = VecOps.dot(r, z);
        for (int it = 1; it <= maxIter; it++) {
            a.multiply(p, q);
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
                return it;
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
