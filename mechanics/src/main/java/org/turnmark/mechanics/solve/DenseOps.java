package org.turnmark.mechanics.solve;

/** Small dense symmetric positive definite kernels (Cholesky). Stateless. */
final class DenseOps {

    private DenseOps() {
    }

    /**
     * Inverts the symmetric positive definite n×n matrix {@code m} (row-major, destroyed) into
     * {@code out[o .. o + n² − 1]} by Cholesky factorisation.
     *
     * @param row index for the error message
     * @throws LinearSolveException if the matrix is not positive definite
     */
    static void invertSpd(double[] m, int n, double[] out, int o, int row) {
        // Cholesky m = L Lᵀ, L stored in the lower triangle of m
        for (int j = 0; j < n; j++) {
            double s = m[n * j + j];
            for (int k = 0; k < j; k++) {
                s -= m[n * j + k] * m[n * j + k];
            }
            if (!(s > 0)) {
                throw new LinearSolveException("diagonal block " + row + " is not positive definite (pivot " + s + ")", true);
            }
            double d = Math.sqrt(s);
            m[n * j + j] = d;
            for (int i = j + 1; i < n; i++) {
                double t = m[n * i + j];
                for (int k = 0; k < j; k++) {
                    t -= m[n * i + k] * m[n * j + k];
                }
                m[n * i + j] = t / d;
            }
        }
        // columns of the inverse: solve L Lᵀ x = e_c
        double[] x = new double[n];
        for (int c = 0; c < n; c++) {
            for (int i = 0; i < n; i++) {
                double t = i == c ? 1 : 0;
                for (int k = 0; k < i; k++) {
                    t -= m[n * i + k] * x[k];
                }
                x[i] = t / m[n * i + i];
            }
            for (int i = n - 1; i >= 0; i--) {
                double t = x[i];
                for (int k = i + 1; k < n; k++) {
                    t -= m[n * k + i] * x[k];
                }
                x[i] = t / m[n * i + i];
            }
            for (int i = 0; i < n; i++) {
                out[o + n * i + c] = x[i];
            }
        }
    }

    /**
     * Cholesky factorisation in place of a dense SPD n×n matrix (row-major, lower triangle used).
     *
     * @throws LinearSolveException if not positive definite
     */
    static void cholesky(double[] m, int n) {
        for (int j = 0; j < n; j++) {
            double s = m[n * j + j];
            for (int k = 0; k < j; k++) {
                s -= m[n * j + k] * m[n * j + k];
            }
            if (!(s > 0)) {
                throw new LinearSolveException("coarse matrix is not positive definite (pivot " + s + " at " + j + ")", true);
            }
            double d = Math.sqrt(s);
            m[n * j + j] = d;
            for (int i = j + 1; i < n; i++) {
                double t = m[n * i + j];
                int ri = n * i;
                int rj = n * j;
                for (int k = 0; k < j; k++) {
                    t -= m[ri + k] * m[rj + k];
                }
                m[n * i + j] = t / d;
            }
        }
    }

    /** Solves L Lᵀ x = b with the factor from {@link #cholesky}; x may alias b. */
    static void choleskySolve(double[] l, int n, double[] b, double[] x) {
        for (int i = 0; i < n; i++) {
            double t = b[i];
            int ri = n * i;
            for (int k = 0; k < i; k++) {
                t -= l[ri + k] * x[k];
            }
            x[i] = t / l[ri + i];
        }
        for (int i = n - 1; i >= 0; i--) {
            double t = x[i];
            for (int k = i + 1; k < n; k++) {
                t -= l[n * k + i] * x[k];
            }
            x[i] = t / l[n * i + i];
        }
    }
}
