package org.turnmark.geom;

/**
 * A regular 3-D sampling grid: dimensions (nx, ny, nz) and the voxel→world affine (RAS+ mm, voxel
 * centres). Voxel (i, j, k) has the flat index {@code i + nx*(j + ny*k)} (x fastest, NIfTI order).
 * Immutable and thread safe.
 */
public final class Grid3 {

    private final int nx;
    private final int ny;
    private final int nz;
    private final Affine3D voxelToWorld;
    private final Affine3D worldToVoxel;

    /**
     * @param nx           voxels along i, ≥ 1
     * @param ny           voxels along j, ≥ 1
     * @param nz           voxels along k, ≥ 1
     * @param voxelToWorld voxel index → RAS+ mm; must be invertible
     * @throws IllegalArgumentException for non-positive sizes, more than {@code Integer.MAX_VALUE - 8}
     *                                  voxels, or a singular affine
     */
    public Grid3(int nx, int ny, int nz, Affine3D voxelToWorld) {
        if (nx < 1 || ny < 1 || nz < 1) {
            throw new IllegalArgumentException("grid dimensions must be >= 1, got " + nx + "x" + ny + "x" + nz);
        }
        long n = (long) nx * ny * nz;
        if (n > Integer.MAX_VALUE - 8) {
            throw new IllegalArgumentException("grid of " + nx + "x" + ny + "x" + nz + " = " + n
                    + " voxels exceeds the largest Java array (" + (Integer.MAX_VALUE - 8) + ")");
        }
        this.nx = nx;
        this.ny = ny;
        this.nz = nz;
        this.voxelToWorld = voxelToWorld;
        try {
            this.worldToVoxel = voxelToWorld.inverse();
        } catch (IllegalStateException e) {
            throw new IllegalArgumentException("voxel-to-world affine is singular: " + voxelToWorld, e);
        }
    }

    /** An axis-aligned RAS grid with the given spacing (mm) and world position of voxel (0,0,0). */
    public static Grid3 axisAligned(int nx, int ny, int nz, double sx, double sy, double sz,
                                    double ox, double oy, double oz) {
        return new Grid3(nx, ny, nz, new Affine3D(sx, 0, 0, ox, 0, sy, 0, oy, 0, 0, sz, oz));
    }

    public int nx() {
        return nx;
    }

    public int ny() {
        return ny;
    }

    public int nz() {
        return nz;
    }

    /** Number of voxels, nx·ny·nz. */
    public int size() {
        return nx * ny * nz;
    }

    /** Flat index of voxel (i, j, k); no bounds check. */
    public int index(int i, int j, int k) {
        return i + nx * (j + ny * k);
    }

    /** True if (i, j, k) lies inside the grid. */
    public boolean contains(int i, int j, int k) {
        return i >= 0 && j >= 0 && k >= 0 && i < nx && j < ny && k < nz;
    }

    public Affine3D voxelToWorld() {
        return voxelToWorld;
    }

    public Affine3D worldToVoxel() {
        return worldToVoxel;
    }

    /** Spacing (mm) along voxel axis {@code axis} (0 = i, 1 = j, 2 = k). */
    public double spacingMm(int axis) {
        return voxelToWorld.columnNorm(axis);
    }

    /** Spacings along i, j, k in mm. */
    public double[] spacingMm() {
        return new double[] {spacingMm(0), spacingMm(1), spacingMm(2)};
    }

    /** Volume of one voxel in mm³ (|det| of the voxel→world linear part). */
    public double voxelVolumeMm3() {
        return Math.abs(voxelToWorld.determinant());
    }

    /** World position (RAS mm) of the centre of voxel (i, j, k), as a new array of 3. */
    public double[] worldOf(double i, double j, double k) {
        return voxelToWorld.applyPoint(i, j, k);
    }

    /**
     * True if both grids have the same dimensions and affines agreeing within {@code tolMm}
     * (entry-wise, mm).
     */
    public boolean sameGrid(Grid3 o, double tolMm) {
        return nx == o.nx && ny == o.ny && nz == o.nz && voxelToWorld.maxAbsDifference(o.voxelToWorld) <= tolMm;
    }

    @Override
    public String toString() {
        return nx + "x" + ny + "x" + nz + " " + voxelToWorld;
    }
}
