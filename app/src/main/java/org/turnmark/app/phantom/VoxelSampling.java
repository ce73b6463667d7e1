package org.turnmark.app.phantom;

import org.turnmark.geom.Grid3;

/** Grid walks and trilinear reads shared by the phantom's rasterising steps. */
final class VoxelSampling {

    /** Receives one voxel: its index (x fastest) and its centre in world mm (read-only, reused). */
    @FunctionalInterface
    interface VoxelVisitor {
        void visit(int v, double[] worldMm);
    }

    private VoxelSampling() {
    }

    /**
     * Visits every voxel of slice {@code k} of {@code grid} in index order (x fastest) with its centre
     * in world mm. The point array is reused from voxel to voxel.
     */
    static void forEachInSlice(Grid3 grid, int k, VoxelVisitor visitor) {
        int nx = grid.nx();
        int ny = grid.ny();
        double[] p = new double[3];
        for (int j = 0; j < ny; j++) {
            for (int i = 0; i < nx; i++) {
                int v = i + nx * (j + ny * k);
                p[0] = i;
                p[1] = j;
                p[2] = k;
                grid.voxelToWorld().applyPoint(p, p);
                visitor.visit(v, p);
            }
        }
    }

    /**
     * Trilinear read of an image of {@code nx × ny × nz} voxels (x fastest) at fractional voxel
     * coordinates; 0 outside the voxel-centre box.
     */
    static double trilinear(float[] img, int nx, int ny, int nz, double fx, double fy, double fz) {
        if (!(fx >= 0 && fy >= 0 && fz >= 0 && fx <= nx - 1 && fy <= ny - 1 && fz <= nz - 1)) {
            return 0;
        }
        int i = Math.min((int) fx, nx - 2);
        int j = Math.min((int) fy, ny - 2);
        int k = Math.min((int) fz, nz - 2);
        double tx = fx - i;
        double ty = fy - j;
        double tz = fz - k;
        int q = i + nx * (j + ny * k);
        int sy = nx;
        int sz = nx * ny;
        double c00 = img[q] + tx * (img[q + 1] - img[q]);
        double c10 = img[q + sy] + tx * (img[q + sy + 1] - img[q + sy]);
        double c01 = img[q + sz] + tx * (img[q + sz + 1] - img[q + sz]);
        double c11 = img[q + sy + sz] + tx * (img[q + sy + sz + 1] - img[q + sy + sz]);
        double c0 = c00 + ty * (c10 - c00);
        double c1 = c01 + ty * (c11 - c01);
        return c0 + tz * (c1 - c0);
    }
}
