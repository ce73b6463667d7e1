package org.turnmark.mechanics.mesh;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;

/**
 * Samples a {@link PointMap} on an image grid as a dense displacement field u(p) = map(p) − p at every
 * voxel centre p, with an explicit inside mask and a stated policy outside the tissue
 * ({@link DenseDisplacement.Extrapolation}).
 *
 * <p>Inside voxels are computed in parallel, one block per k-slice (a partition fixed by the grid),
 * each voxel independently: results do not depend on the thread count. The nearest-surface extension
 * finds each outside voxel's nearest inside voxel by two raster passes of neighbour propagation
 * (forward over the 13 earlier neighbours, then backward over the 13 later ones, comparing true
 * world distances), the usual sequential approximation of the Euclidean distance transform (Danielsson,
 * Comput Graph Image Process 14, 1980); its nearest voxel can be off by a fraction of a voxel in rare
 * configurations, which the smooth decay makes immaterial. Stateless, thread safe.
 */
public final class DisplacementFieldSampler {

    private DisplacementFieldSampler() {
    }

    /**
     * Samples {@code map} on {@code grid}.
     *
     * @param map           source → target configuration; the grid's voxel centres are source points
     * @param grid          any image grid (oblique, left-handed, any spacing)
     * @param extrapolation the outside policy
     * @return a new field; components in RAS mm
     */
    public static DenseDisplacement sample(PointMap map, Grid3 grid, DenseDisplacement.Extrapolation extrapolation) {
        final int nx = grid.nx();
        final int ny = grid.ny();
        final int nz = grid.nz();
        final int n = grid.size();
        final float[] ux = new float[n];
        final float[] uy = new float[n];
        final float[] uz = new float[n];
        final byte[] inside = new byte[n];
        final double[] m = grid.voxelToWorld().toRowMajor();
        final int[] sliceCount = new int[nz];
        Parallel.forEachBlock(nz, 64L * n, k -> {
            PointMap.Evaluator ev = map.evaluator();
            double[] out = new double[3];
            int count = 0;
            for (int j = 0; j < ny; j++) {
                int row = nx * (j + ny * k);
                double bx = m[1] * j + m[2] * k + m[3];
                double by = m[5] * j + m[6] * k + m[7];
                double bz = m[9] * j + m[10] * k + m[11];
                for (int i = 0; i < nx; i++) {
                    double px = bx + m[0] * i;
                    double py = by + m[4] * i;
                    double pz = bz + m[8] * i;
                    if (ev.map(px, py, pz, out)) {
                        int v = row + i;
                        ux[v] = (float) (out[0] - px);
                        uy[v] = (float) (out[1] - py);
                        uz[v] = (float) (out[2] - pz);
                        inside[v] = 1;
                        count++;
                    }
                }
            }
            sliceCount[k] = count;
        });
        int total = 0;
        for (int c : sliceCount) {
            total += c;
        }
        if (extrapolation.kind() == DenseDisplacement.Extrapolation.Kind.NEAREST_DECAY && total > 0 && total < n) {
            extend(grid, ux, uy, uz, inside, extrapolation.decayMm());
        }
        return new DenseDisplacement(grid, ux, uy, uz, inside, total, extrapolation);
    }

    /** Fills outside voxels with the nearest inside displacement times exp(−(d/L)²). */
    private static void extend(Grid3 grid, float[] ux, float[] uy, float[] uz, byte[] inside, double decayMm) {
        int nx = grid.nx();
        int ny = grid.ny();
        int nz = grid.nz();
        int n = grid.size();
        Affine3D a = grid.voxelToWorld();
        double[] m = a.toRowMajor();
        // Squared world length of voxel offset (di, dj, dk) = dᵀ G d, G = AᵀA (the metric of the grid).
        double[] gm = new double[9];
        for (int r = 0; r < 3; r++) {
            for (int c = 0; c < 3; c++) {
                gm[3 * r + c] = m[r] * m[c] + m[4 + r] * m[4 + c] + m[8 + r] * m[8 + c];
            }
        }
        int[] nearest = new int[n];
        for (int v = 0; v < n; v++) {
            nearest[v] = inside[v] != 0 ? v : -1;
        }
        // The 13 neighbours preceding a voxel in raster order; the backward pass uses their negatives.
        int[][] half = new int[13][];
        int h = 0;
        for (int dk = -1; dk <= 0; dk++) {
            for (int dj = -1; dj <= 1; dj++) {
                for (int di = -1; di <= 1; di++) {
                    if (dk < 0 || dj < 0 || (dj == 0 && di < 0)) {
                        half[h++] = new int[] {di, dj, dk};
                    }
                }
            }
        }
        for (int pass = 0; pass < 2; pass++) {
            int sign = pass == 0 ? 1 : -1;
            for (int t = 0; t < n; t++) {
                int v = pass == 0 ? t : n - 1 - t;
                if (inside[v] != 0) {
                    continue;
                }
                int i = v % nx;
                int j = (v / nx) % ny;
                int k = v / (nx * ny);
                int best = nearest[v];
                double bestD = best < 0 ? Double.POSITIVE_INFINITY : dist2(gm, nx, ny, best, i, j, k);
                for (int[] d : half) {
                    int qi = i + sign * d[0];
                    int qj = j + sign * d[1];
                    int qk = k + sign * d[2];
                    if (qi < 0 || qj < 0 || qk < 0 || qi >= nx || qj >= ny || qk >= nz) {
                        continue;
                    }
                    int cand = nearest[qi + nx * (qj + ny * qk)];
                    if (cand < 0 || cand == best) {
                        continue;
                    }
                    double d2 = dist2(gm, nx, ny, cand, i, j, k);
                    if (d2 < bestD || (d2 == bestD && cand < best)) {
                        best = cand;
                        bestD = d2;
                    }
                }
                nearest[v] = best;
            }
        }
        double inv = 1.0 / (decayMm * decayMm);
        for (int v = 0; v < n; v++) {
            if (inside[v] != 0 || nearest[v] < 0) {
                continue;
            }
            int s = nearest[v];
            double w = Math.exp(-dist2(gm, nx, ny, s, v % nx, (v / nx) % ny, v / (nx * ny)) * inv);
            ux[v] = (float) (w * ux[s]);
            uy[v] = (float) (w * uy[s]);
            uz[v] = (float) (w * uz[s]);
        }
    }

    private static double dist2(double[] g, int nx, int ny, int s, int i, int j, int k) {
        double di = i - s % nx;
        double dj = j - (s / nx) % ny;
        double dk = k - s / (nx * ny);
        return g[0] * di * di + g[4] * dj * dj + g[8] * dk * dk
                + 2 * (g[1] * di * dj + g[2] * di * dk + g[5] * dj * dk);
    }
}
