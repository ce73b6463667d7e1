package org.turnmark.mechanics.solve;

import java.util.Random;

import org.turnmark.mechanics.mesh.HexMesh;

/** Structured box problems for solver tests: symmetry constraints and consistent face loads. */
final class BoxProblems {

    private BoxProblems() {
    }

    /**
     * Box mesh with every node whose grid index is interior in direction d moved along d by up to
     * ±{@code amplitude}·h/2 (so faces stay planar and the outline unchanged).
     */
    static HexMesh distortedBox(int nx, int ny, int nz, double lx, double ly, double lz, double amplitude, long seed) {
        HexMesh m = TestMeshes.box(nx, ny, nz, lx, ly, lz);
        double[] x = m.xyzMm().clone();
        Random rnd = new Random(seed);
        int[] dims = {nx, ny, nz};
        double[] h = {lx / nx, ly / ny, lz / nz};
        for (int k = 0; k <= nz; k++) {
            for (int j = 0; j <= ny; j++) {
                for (int i = 0; i <= nx; i++) {
                    int n = TestMeshes.node(nx, ny, i, j, k);
                    int[] g = {i, j, k};
                    for (int d = 0; d < 3; d++) {
                        if (g[d] > 0 && g[d] < dims[d]) {
                            x[3 * n + d] += amplitude * h[d] * (rnd.nextDouble() - 0.5);
                        }
                    }
                }
            }
        }
        return m.withNodes(x);
    }

    /**
     * Symmetry constraints of a box: nodes on x = 0 keep u_x = 0, on y = 0 u_y = 0, on z = 0 u_z = 0
     * (planes, lines where two meet, fixed at the origin).
     */
    static NodeConstraints symmetryPlanes(int nx, int ny, int nz, boolean zPlane) {
        NodeConstraints c = new NodeConstraints((nx + 1) * (ny + 1) * (nz + 1));
        for (int k = 0; k <= nz; k++) {
            for (int j = 0; j <= ny; j++) {
                for (int i = 0; i <= nx; i++) {
                    int n = TestMeshes.node(nx, ny, i, j, k);
                    boolean bx = i == 0;
                    boolean by = j == 0;
                    boolean bz = zPlane && k == 0;
                    int count = (bx ? 1 : 0) + (by ? 1 : 0) + (bz ? 1 : 0);
                    if (count == 3) {
                        c.fix(n);
                    } else if (count == 2) {
                        c.guide(n, bx ? 0 : 1, by ? 0 : 1, bz ? 0 : 1);
                    } else if (count == 1) {
                        c.slide(n, bx ? 1 : 0, by ? 1 : 0, bz ? 1 : 0);
                    }
                }
            }
        }
        return c;
    }

    /**
     * Consistent nodal forces of a uniform dead traction t (mN/mm², reference configuration) on the
     * face of a structured box where grid index {@code axis} equals its maximum: each bilinear face
     * quad contributes ∫ N_a t dA (2×2 Gauss, exact for the planar quads used here).
     *
     * @param out nodal forces, mN, 3 per node; added to
     */
    static void addFaceTraction(HexMesh mesh, int nx, int ny, int nz, int axis, double[] t, double[] out) {
        int[] dims = {nx, ny, nz};
        int a1 = (axis + 1) % 3;
        int a2 = (axis + 2) % 3;
        double[] x = mesh.xyzMm();
        double g = 1 / Math.sqrt(3);
        for (int q = 0; q < dims[a2]; q++) {
            for (int p = 0; p < dims[a1]; p++) {
                int[] nodes = new int[4];
                int[][] offs = {{0, 0}, {1, 0}, {1, 1}, {0, 1}};
                for (int c = 0; c < 4; c++) {
                    int[] idx = new int[3];
                    idx[axis] = dims[axis];
                    idx[a1] = p + offs[c][0];
                    idx[a2] = q + offs[c][1];
                    nodes[c] = TestMeshes.node(nx, ny, idx[0], idx[1], idx[2]);
                }
                for (int gq = 0; gq < 4; gq++) {
                    double s = (gq == 1 || gq == 2) ? g : -g;
                    double r = gq >= 2 ? g : -g;
                    double[] ns = {(1 - s) * (1 - r) / 4, (1 + s) * (1 - r) / 4, (1 + s) * (1 + r) / 4, (1 - s) * (1 + r) / 4};
                    double[] ds = {-(1 - r) / 4, (1 - r) / 4, (1 + r) / 4, -(1 + r) / 4};
                    double[] dr = {-(1 - s) / 4, -(1 + s) / 4, (1 + s) / 4, (1 - s) / 4};
                    double[] xs = new double[3];
                    double[] xr = new double[3];
                    for (int c = 0; c < 4; c++) {
                        for (int d = 0; d < 3; d++) {
                            xs[d] += ds[c] * x[3 * nodes[c] + d];
                            xr[d] += dr[c] * x[3 * nodes[c] + d];
                        }
                    }
                    double cx = xs[1] * xr[2] - xs[2] * xr[1];
                    double cy = xs[2] * xr[0] - xs[0] * xr[2];
                    double cz = xs[0] * xr[1] - xs[1] * xr[0];
                    double da = Math.sqrt(cx * cx + cy * cy + cz * cz);
                    for (int c = 0; c < 4; c++) {
                        for (int d = 0; d < 3; d++) {
                            out[3 * nodes[c] + d] += ns[c] * da * t[d];
                        }
                    }
                }
            }
        }
    }
}
