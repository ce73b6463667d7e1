package org.turnmark.mechanics.solve;

/**
 * The per-node projector P of {@link NodeConstraints} (I free, 0 fixed, I − n nᵀ sliding) applied
 * to nodal vectors and to a {@link BlockCsr} with 3×3 blocks. Immutable; thread safe.
 */
final class Projector {

    static final byte FREE = 0;
    static final byte FIXED = 1;
    static final byte SLIDING = 2;
    static final byte LINE = 3;

    final byte[] kind;
    final double[] normal;
    private final int[] constrained;

    Projector(NodeConstraints c) {
        kind = c.kinds();
        normal = c.normals();
        int m = 0;
        for (byte k : kind) {
            if (k != FREE) {
                m++;
            }
        }
        constrained = new int[m];
        m = 0;
        for (int n = 0; n < kind.length; n++) {
            if (kind[n] != FREE) {
                constrained[m++] = n;
            }
        }
    }

    int constrainedCount() {
        return constrained.length;
    }

    /** v ← P v (in place), v of length 3·nodes. */
    void project(double[] v) {
        for (int n : constrained) {
            int o = 3 * n;
            if (kind[n] == FIXED) {
                v[o] = 0;
                v[o + 1] = 0;
                v[o + 2] = 0;
            } else if (kind[n] == SLIDING) {
                double nx = normal[o], ny = normal[o + 1], nz = normal[o + 2];
                double s = v[o] * nx + v[o + 1] * ny + v[o + 2] * nz;
                v[o] -= s * nx;
                v[o + 1] -= s * ny;
                v[o + 2] -= s * nz;
            } else {
                double tx = normal[o], ty = normal[o + 1], tz = normal[o + 2];
                double s = v[o] * tx + v[o + 1] * ty + v[o + 2] * tz;
                v[o] = s * tx;
                v[o + 1] = s * ty;
                v[o + 2] = s * tz;
            }
        }
    }

    /** P of node n (I free, 0 fixed, I − n nᵀ sliding, t tᵀ line) as row-major 3×3 into out. */
    void matrix(int n, double[] out) {
        int o = 3 * n;
        for (int i = 0; i < 3; i++) {
            for (int j = 0; j < 3; j++) {
                double id = i == j ? 1 : 0;
                switch (kind[n]) {
                    case FIXED:
                        out[3 * i + j] = 0;
                        break;
                    case SLIDING:
                        out[3 * i + j] = id - normal[o + i] * normal[o + j];
                        break;
                    case LINE:
                        out[3 * i + j] = normal[o + i] * normal[o + j];
                        break;
                    default:
                        out[3 * i + j] = id;
                }
            }
        }
    }

    /**
     * A ← P A P + s (I − P) on the block diagonal, in place (A with 3×3 blocks, symmetric pattern),
     * with s the mean diagonal entry of the node's original block so that the eliminated directions
     * have the same scale as the others (better for preconditioners; the solution is unaffected
     * because the right-hand side is projected).
     */
    void projectMatrix(BlockCsr a) {
        if (constrained.length == 0) {
            return;
        }
        double[] p = new double[9];
        double[] q = new double[9];
        double[] t = new double[9];
        double[] v = a.val;
        double[] scale = new double[constrained.length];
        for (int q2 = 0; q2 < constrained.length; q2++) {
            int d = 9 * a.diag[constrained[q2]];
            double s = (v[d] + v[d + 4] + v[d + 8]) / 3;
            scale[q2] = s > 0 ? s : 1;
        }
        // left-multiply rows of constrained nodes
        for (int n : constrained) {
            matrix(n, p);
            for (int k = a.rowPtr[n]; k < a.rowPtr[n + 1]; k++) {
                mul(p, v, 9 * k, t);
                System.arraycopy(t, 0, v, 9 * k, 9);
            }
        }
        // right-multiply blocks in columns of constrained nodes; the pattern is symmetric, so the
        // blocks of column n are found through the rows listed in row n
        for (int q2 = 0; q2 < constrained.length; q2++) {
            int n = constrained[q2];
            matrix(n, p);
            for (int k = a.rowPtr[n]; k < a.rowPtr[n + 1]; k++) {
                int r = a.col[k];
                int kk = a.find(r, n);
                for (int i = 0; i < 9; i++) {
                    q[i] = v[9 * kk + i];
                }
                mulRight(q, p, t);
                System.arraycopy(t, 0, v, 9 * kk, 9);
            }
            int d = a.diag[n];
            for (int i = 0; i < 9; i++) {
                v[9 * d + i] += scale[q2] * ((i % 4 == 0 ? 1 : 0) - p[i]);
            }
        }
    }

    private static void mul(double[] p, double[] v, int o, double[] out) {
        for (int i = 0; i < 3; i++) {
            for (int j = 0; j < 3; j++) {
                out[3 * i + j] = p[3 * i] * v[o + j] + p[3 * i + 1] * v[o + 3 + j] + p[3 * i + 2] * v[o + 6 + j];
            }
        }
    }

    private static void mulRight(double[] q, double[] p, double[] out) {
        for (int i = 0; i < 3; i++) {
            for (int j = 0; j < 3; j++) {
                out[3 * i + j] = q[3 * i] * p[j] + q[3 * i + 1] * p[3 + j] + q[3 * i + 2] * p[6 + j];
            }
        }
    }
}
