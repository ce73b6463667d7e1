package org.turnmark.mechanics.solve;

import org.turnmark.mechanics.mesh.HexMesh;

/** Structured box meshes for tests. */
public final class TestMeshes {

    private TestMeshes() {
    }

    /** n values uniform in [−0.5, 0.5) from {@code rnd} (seeded by the caller). */
    public static double[] randomVector(java.util.Random rnd, int n) {
        double[] v = new double[n];
        for (int i = 0; i < n; i++) {
            v[i] = rnd.nextDouble() - 0.5;
        }
        return v;
    }

    /** Node index of grid point (i, j, k) in a box of nx × ny × nz elements. */
    public static int node(int nx, int ny, int i, int j, int k) {
        return i + (nx + 1) * (j + (ny + 1) * k);
    }

    /**
     * Box [0, lx] × [0, ly] × [0, lz] mm of nx × ny × nz hexahedra, VTK node order, label 1.
     */
    public static HexMesh box(int nx, int ny, int nz, double lx, double ly, double lz) {
        double[] xyz = new double[3 * (nx + 1) * (ny + 1) * (nz + 1)];
        for (int k = 0; k <= nz; k++) {
            for (int j = 0; j <= ny; j++) {
                for (int i = 0; i <= nx; i++) {
                    int n = node(nx, ny, i, j, k);
                    xyz[3 * n] = lx * i / nx;
                    xyz[3 * n + 1] = ly * j / ny;
                    xyz[3 * n + 2] = lz * k / nz;
                }
            }
        }
        int[] hex = new int[8 * nx * ny * nz];
        int[] label = new int[nx * ny * nz];
        int e = 0;
        for (int k = 0; k < nz; k++) {
            for (int j = 0; j < ny; j++) {
                for (int i = 0; i < nx; i++) {
                    int[] c = {node(nx, ny, i, j, k), node(nx, ny, i + 1, j, k), node(nx, ny, i + 1, j + 1, k),
                            node(nx, ny, i, j + 1, k), node(nx, ny, i, j, k + 1), node(nx, ny, i + 1, j, k + 1),
                            node(nx, ny, i + 1, j + 1, k + 1), node(nx, ny, i, j + 1, k + 1)};
                    System.arraycopy(c, 0, hex, 8 * e, 8);
                    label[e] = 1;
                    e++;
                }
            }
        }
        return new HexMesh(xyz, hex, label);
    }
}
