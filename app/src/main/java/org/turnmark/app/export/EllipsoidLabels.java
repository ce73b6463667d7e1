package org.turnmark.app.export;

import java.util.List;

import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.Volume;

/**
 * A label image of ellipsoids: voxel value {@code n + 1} where the voxel centre lies inside
 * ellipsoid n (later ellipsoids win where they overlap), 0 elsewhere. Only the bounding box of each
 * ellipsoid is visited. Stateless.
 */
public final class EllipsoidLabels {

    private EllipsoidLabels() {
    }

    /**
     * Renders the ellipsoids on a grid.
     *
     * @param grid       target grid (world RAS mm)
     * @param ellipsoids ellipsoids, at most 255
     * @return a new volume of whole-number labels
     */
    public static Volume render(Grid3 grid, List<Ellipsoid> ellipsoids) {
        if (ellipsoids.size() > 255) {
            throw new IllegalArgumentException("at most 255 ellipsoids fit in a uint8 label image, got " + ellipsoids.size());
        }
        float[] out = new float[grid.size()];
        Affine3D w2v = grid.worldToVoxel();
        double[] p = new double[3];
        for (int n = 0; n < ellipsoids.size(); n++) {
            Ellipsoid e = ellipsoids.get(n);
            double[] c = e.centerRasMm();
            double r = e.semiAxesMm()[0];
            // Voxel bounding box of the sphere of the longest semi-axis around the centre.
            int[] lo = {Integer.MAX_VALUE, Integer.MAX_VALUE, Integer.MAX_VALUE};
            int[] hi = {Integer.MIN_VALUE, Integer.MIN_VALUE, Integer.MIN_VALUE};
            for (int corner = 0; corner < 8; corner++) {
                double[] q = w2v.applyPoint(c[0] + ((corner & 1) == 0 ? -r : r), c[1] + ((corner & 2) == 0 ? -r : r),
                        c[2] + ((corner & 4) == 0 ? -r : r));
                for (int a = 0; a < 3; a++) {
                    lo[a] = Math.min(lo[a], (int) Math.floor(q[a]));
                    hi[a] = Math.max(hi[a], (int) Math.ceil(q[a]));
                }
            }
            int i0 = Math.max(0, lo[0]);
            int j0 = Math.max(0, lo[1]);
            int k0 = Math.max(0, lo[2]);
            int i1 = Math.min(grid.nx() - 1, hi[0]);
            int j1 = Math.min(grid.ny() - 1, hi[1]);
            int k1 = Math.min(grid.nz() - 1, hi[2]);
            for (int k = k0; k <= k1; k++) {
                for (int j = j0; j <= j1; j++) {
                    for (int i = i0; i <= i1; i++) {
                        p[0] = i;
                        p[1] = j;
                        p[2] = k;
                        grid.voxelToWorld().applyPoint(p, p);
                        if (e.contains(p)) {
                            out[grid.index(i, j, k)] = n + 1;
                        }
                    }
                }
            }
        }
        return new Volume(grid, out);
    }
}
