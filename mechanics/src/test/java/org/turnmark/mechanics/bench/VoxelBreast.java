package org.turnmark.mechanics.bench;

import java.util.Arrays;

import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.mechanics.solve.NodeConstraints;

/**
 * Synthetic voxel-hexahedron breast phantoms for benchmarks and tests: a half-ellipsoid of tissue
 * on a flat chest wall at y = 0 (RAS: the breast points anterior, +y). Invented geometry.
 */
public final class VoxelBreast {

    private VoxelBreast() {
    }

    /**
     * Voxelised half-ellipsoid x²/ax² + y²/ay² + z²/az² ≤ 1, y ≥ 0, element edge h (an element is
     * kept when its centre is inside). Label 1 (fat) everywhere, 2 (fibroglandular) within half
     * the radius of the centre of the base, as an invented two-tissue layout when {@code twoTissue}.
     */
    public static HexMesh halfEllipsoid(double ax, double ay, double az, double h, boolean twoTissue) {
        int nx = (int) Math.ceil(2 * ax / h);
        int ny = (int) Math.ceil(ay / h);
        int nz = (int) Math.ceil(2 * az / h);
        double x0 = -nx * h / 2;
        double z0 = -nz * h / 2;
        int[] nodeId = new int[(nx + 1) * (ny + 1) * (nz + 1)];
        Arrays.fill(nodeId, -1);
        int[] hex = new int[8 * nx * ny * nz];
        int[] label = new int[nx * ny * nz];
        int ne = 0;
        int nn = 0;
        double[] xyz = new double[3 * nodeId.length];
        int[][] corner = {{0, 0, 0}, {1, 0, 0}, {1, 1, 0}, {0, 1, 0}, {0, 0, 1}, {1, 0, 1}, {1, 1, 1}, {0, 1, 1}};
        for (int k = 0; k < nz; k++) {
            for (int j = 0; j < ny; j++) {
                for (int i = 0; i < nx; i++) {
                    double cx = x0 + (i + 0.5) * h;
                    double cy = (j + 0.5) * h;
                    double cz = z0 + (k + 0.5) * h;
                    double q = cx * cx / (ax * ax) + cy * cy / (ay * ay) + cz * cz / (az * az);
                    if (q > 1) {
                        continue;
                    }
                    for (int a = 0; a < 8; a++) {
                        int ii = i + corner[a][0];
                        int jj = j + corner[a][1];
                        int kk = k + corner[a][2];
                        int g = ii + (nx + 1) * (jj + (ny + 1) * kk);
                        if (nodeId[g] < 0) {
                            nodeId[g] = nn;
                            xyz[3 * nn] = x0 + ii * h;
                            xyz[3 * nn + 1] = jj * h;
                            xyz[3 * nn + 2] = z0 + kk * h;
                            nn++;
                        }
                        hex[8 * ne + a] = nodeId[g];
                    }
                    label[ne] = twoTissue && q < 0.25 ? 2 : 1;
                    ne++;
                }
            }
        }
        return new HexMesh(Arrays.copyOf(xyz, 3 * nn), Arrays.copyOf(hex, 8 * ne), Arrays.copyOf(label, ne));
    }

    /** Chest-wall nodes (y = 0) fixed. */
    public static NodeConstraints fixedChestWall(HexMesh mesh) {
        NodeConstraints c = new NodeConstraints(mesh.nodeCount());
        double[] x = mesh.xyzMm();
        for (int n = 0; n < mesh.nodeCount(); n++) {
            if (Math.abs(x[3 * n + 1]) < 1e-9) {
                c.fix(n);
            }
        }
        return c;
    }

    /**
     * Chest-wall nodes (y = 0) sliding on the wall (normal +y), except those within {@code rimMm} of
     * the base outline, which are fixed (a flat wall alone would let the body slide away).
     */
    public static NodeConstraints slidingChestWall(HexMesh mesh, double ax, double az, double rimMm) {
        NodeConstraints c = new NodeConstraints(mesh.nodeCount());
        double[] x = mesh.xyzMm();
        for (int n = 0; n < mesh.nodeCount(); n++) {
            if (Math.abs(x[3 * n + 1]) < 1e-9) {
                double px = x[3 * n];
                double pz = x[3 * n + 2];
                double ex = Math.abs(px) + rimMm;
                double ez = Math.abs(pz) + rimMm;
                boolean nearRim = ex * ex / (ax * ax) + pz * pz / (az * az) > 1
                        || px * px / (ax * ax) + ez * ez / (az * az) > 1;
                if (nearRim) {
                    c.fix(n);
                } else {
                    c.slide(n, 0, 1, 0);
                }
            }
        }
        return c;
    }
}
