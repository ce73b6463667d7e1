package org.turnmark.registration.resample;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;

/**
 * Builders for resampling grids. World = RAS+ mm; a grid's field of view is the box from the outer
 * faces of its edge voxels ({@code n·spacing} along each voxel axis), its centre the world point of
 * continuous voxel index {@code ((nx-1)/2, (ny-1)/2, (nz-1)/2)}.
 */
public final class Grids {

    private Grids() {
    }

    /** World position (RAS mm) of the centre of the grid's field of view, as a new array of 3. */
    public static double[] centreMm(Grid3 g) {
        return g.worldOf((g.nx() - 1) / 2.0, (g.ny() - 1) / 2.0, (g.nz() - 1) / 2.0);
    }

    /**
     * A grid with isotropic spacing {@code spacingMm} covering the field of view of {@code g}: same
     * voxel-axis directions (unit columns of g's voxel→world), {@code round(n·s/spacingMm)} voxels
     * per axis (at least 1), centred on the same world point.
     *
     * @throws IllegalArgumentException if spacingMm is not finite and &gt; 0
     */
    public static Grid3 isotropicCovering(Grid3 g, double spacingMm) {
        if (!(spacingMm > 0) || Double.isInfinite(spacingMm)) {
            throw new IllegalArgumentException("isotropic spacing must be finite and > 0 mm, got " + spacingMm);
        }
        int[] n = {g.nx(), g.ny(), g.nz()};
        int[] m = new int[3];
        double[] col = new double[12];
        double[] a = g.voxelToWorld().toRowMajor();
        for (int c = 0; c < 3; c++) {
            double s = g.spacingMm(c);
            long count = Math.round(n[c] * s / spacingMm);
            if (count > Integer.MAX_VALUE) {
                throw new IllegalArgumentException("isotropic grid would have " + count + " voxels along axis " + c);
            }
            m[c] = (int) Math.max(1, count);
            for (int r = 0; r < 3; r++) {
                col[4 * r + c] = a[4 * r + c] / s * spacingMm;
            }
        }
        return centredOn(m, col, centreMm(g));
    }

    /**
     * The grid {@code g} rotated by {@code angleRad} about the axis (ax, ay, az) (world directions)
     * through its field-of-view centre: same dimensions and spacing, voxel→world
     * {@code T(c) · R · T(-c) · g.voxelToWorld()}.
     */
    public static Grid3 rotatedAboutCentre(Grid3 g, double ax, double ay, double az, double angleRad) {
        double[] c = centreMm(g);
        Affine3D r = Affine3D.translation(c[0], c[1], c[2])
                .compose(Affine3D.rotation(ax, ay, az, angleRad))
                .compose(Affine3D.translation(-c[0], -c[1], -c[2]));
        return new Grid3(g.nx(), g.ny(), g.nz(), r.compose(g.voxelToWorld()));
    }

    /**
     * A grid with every spacing multiplied by {@code factor} (e.g. 2 for the next coarser level of a
     * pyramid, 0.5 for a finer one) covering the same field of view: same voxel-axis directions,
     * {@code max(1, round(n/factor))} voxels per axis, centred on the same world point.
     *
     * @throws IllegalArgumentException if factor is not finite and &gt; 0
     */
    public static Grid3 rescaled(Grid3 g, double factor) {
        if (!(factor > 0) || Double.isInfinite(factor)) {
            throw new IllegalArgumentException("scale factor must be finite and > 0, got " + factor);
        }
        int[] n = {g.nx(), g.ny(), g.nz()};
        int[] m = new int[3];
        double[] a = g.voxelToWorld().toRowMajor();
        double[] col = new double[12];
        for (int c = 0; c < 3; c++) {
            long count = Math.round(n[c] / factor);
            if (count > Integer.MAX_VALUE) {
                throw new IllegalArgumentException("rescaled grid would have " + count + " voxels along axis " + c);
            }
            m[c] = (int) Math.max(1, count);
            for (int r = 0; r < 3; r++) {
                col[4 * r + c] = a[4 * r + c] * factor;
            }
        }
        return centredOn(m, col, centreMm(g));
    }

    /** Grid with linear part {@code col} whose voxel ((m-1)/2) maps to {@code centre}: origin = centre − A·(m−1)/2. */
    private static Grid3 centredOn(int[] m, double[] col, double[] centre) {
        for (int r = 0; r < 3; r++) {
            col[4 * r + 3] = centre[r] - col[4 * r] * (m[0] - 1) / 2.0 - col[4 * r + 1] * (m[1] - 1) / 2.0
                    - col[4 * r + 2] * (m[2] - 1) / 2.0;
        }
        return new Grid3(m[0], m[1], m[2], Affine3D.fromRowMajor(col));
    }
}
