package org.turnmark.mechanics.solve;

import org.turnmark.mechanics.mesh.HexMesh;

/**
 * Detects bodies that the constraints do not hold: for each connected piece of the mesh (elements
 * sharing nodes), the 6×6 matrix G = Σ_n Rₙᵀ (I − Pₙ) Rₙ over its nodes, with Rₙ = [I, −[xₙ − c]ₓ/L]
 * the rigid-body modes at node n (centroid c, RMS radius L) and Pₙ the constraint projector, is
 * singular exactly when some rigid motion of the piece violates no constraint (a floating body).
 * Tested by Cholesky with a relative pivot threshold.
 */
final class RigidModeCheck {

    /**
     * Relative Cholesky pivot below which G counts as singular: G is assembled from unit-scaled
     * modes, so a held piece has pivots of order (constrained nodes)·O(1); 1e−9 of the largest
     * diagonal leaves a wide margin above round-off (~1e−16 · 6).
     */
    static final double PIVOT_TOLERANCE = 1e-9;

    private RigidModeCheck() {
    }

    static void requireNoFloatingPiece(HexMesh mesh, NodeConstraints c) {
        int nodes = mesh.nodeCount();
        int[] hex = mesh.hex();
        int[] parent = new int[nodes];
        for (int n = 0; n < nodes; n++) {
            parent[n] = n;
        }
        for (int e = 0; e < hex.length / 8; e++) {
            int r0 = find(parent, hex[8 * e]);
            for (int a = 1; a < 8; a++) {
                int r = find(parent, hex[8 * e + a]);
                if (r != r0) {
                    parent[r] = r0;
                }
            }
        }
        boolean[] used = new boolean[nodes];
        for (int v : hex) {
            used[v] = true;
        }
        int[] comp = new int[nodes];
        int[] rootIndex = new int[nodes];
        java.util.Arrays.fill(rootIndex, -1);
        int nc = 0;
        for (int n = 0; n < nodes; n++) {
            if (!used[n]) {
                comp[n] = -1;
                continue;
            }
            int r = find(parent, n);
            if (rootIndex[r] < 0) {
                rootIndex[r] = nc++;
            }
            comp[n] = rootIndex[r];
        }
        double[] xyz = mesh.xyzMm();
        double[] cen = new double[3 * nc];
        int[] cnt = new int[nc];
        for (int n = 0; n < nodes; n++) {
            if (comp[n] >= 0) {
                cen[3 * comp[n]] += xyz[3 * n];
                cen[3 * comp[n] + 1] += xyz[3 * n + 1];
                cen[3 * comp[n] + 2] += xyz[3 * n + 2];
                cnt[comp[n]]++;
            }
        }
        double[] rad = new double[nc];
        for (int k = 0; k < nc; k++) {
            cen[3 * k] /= cnt[k];
            cen[3 * k + 1] /= cnt[k];
            cen[3 * k + 2] /= cnt[k];
        }
        for (int n = 0; n < nodes; n++) {
            if (comp[n] >= 0) {
                int k = comp[n];
                double dx = xyz[3 * n] - cen[3 * k];
                double dy = xyz[3 * n + 1] - cen[3 * k + 1];
                double dz = xyz[3 * n + 2] - cen[3 * k + 2];
                rad[k] += dx * dx + dy * dy + dz * dz;
            }
        }
        double[] g = new double[36 * nc];
        double[] nrm = new double[3];
        double[] rm = new double[18];
        double[] q = new double[9];
        for (int n = 0; n < nodes; n++) {
            int k = comp[n];
            NodeConstraints.Kind kind = k < 0 ? NodeConstraints.Kind.FREE : c.kind(n);
            if (kind == NodeConstraints.Kind.FREE) {
                continue;
            }
            double len = Math.sqrt(rad[k] / cnt[k]);
            double s = len > 0 ? 1 / len : 1;
            double dx = (xyz[3 * n] - cen[3 * k]) * s;
            double dy = (xyz[3 * n + 1] - cen[3 * k + 1]) * s;
            double dz = (xyz[3 * n + 2] - cen[3 * k + 2]) * s;
            // R = [I | −[d]ₓ]: displacement of mode (t, ω) is t + ω × d
            double[] r = {1, 0, 0, 0, dz, -dy, 0, 1, 0, -dz, 0, dx, 0, 0, 1, dy, -dx, 0};
            System.arraycopy(r, 0, rm, 0, 18);
            // Q = I − P: identity (fixed), n nᵀ (sliding) or I − t tᵀ (line)
            c.normal(n, nrm);
            for (int i = 0; i < 3; i++) {
                for (int j = 0; j < 3; j++) {
                    double id = i == j ? 1 : 0;
                    switch (kind) {
                        case FIXED:
                            q[3 * i + j] = id;
                            break;
                        case SLIDING:
                            q[3 * i + j] = nrm[i] * nrm[j];
                            break;
                        default:
                            q[3 * i + j] = id - nrm[i] * nrm[j];
                    }
                }
            }
            for (int a = 0; a < 6; a++) {
                for (int b = 0; b < 6; b++) {
                    double sum = 0;
                    for (int i = 0; i < 3; i++) {
                        for (int j = 0; j < 3; j++) {
                            sum += rm[6 * i + a] * q[3 * i + j] * rm[6 * j + b];
                        }
                    }
                    g[36 * k + 6 * a + b] += sum;
                }
            }
        }
        for (int k = 0; k < nc; k++) {
            double[] m = new double[36];
            System.arraycopy(g, 36 * k, m, 0, 36);
            double maxDiag = 0;
            for (int i = 0; i < 6; i++) {
                maxDiag = Math.max(maxDiag, m[7 * i]);
            }
            if (!spdWithMargin(m, maxDiag * PIVOT_TOLERANCE)) {
                String what = nc == 1 ? "the tissue" : "a disconnected piece of tissue (" + cnt[k] + " nodes, centroid "
                        + String.format("(%.1f, %.1f, %.1f) mm", cen[3 * k], cen[3 * k + 1], cen[3 * k + 2]) + ")";
                throw new IllegalArgumentException("the constraints do not hold " + what
                        + " against rigid motion (a floating body): fix or slide enough nodes on the chest wall"
                        + " (sliding on a single flat plane still lets the body slide and spin in that plane)");
            }
        }
    }

    private static boolean spdWithMargin(double[] m, double tol) {
        int n = 6;
        for (int j = 0; j < n; j++) {
            double s = m[n * j + j];
            for (int k = 0; k < j; k++) {
                s -= m[n * j + k] * m[n * j + k];
            }
            if (!(s > tol)) {
                return false;
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
        return true;
    }

    private static int find(int[] parent, int x) {
        while (parent[x] != x) {
            parent[x] = parent[parent[x]];
            x = parent[x];
        }
        return x;
    }
}
