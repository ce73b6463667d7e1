package org.turnmark.mechanics.mesh;

import org.turnmark.geom.Grid3;

/** Small synthetic label volumes for the mesh tests (invented shapes). */
final class LabelVolumes {

    private LabelVolumes() {
    }

    /** Sets label {@code value} on voxels i in [i0, i1), j in [j0, j1), k in [k0, k1). */
    static void fillBox(Grid3 g, byte[] lab, int i0, int i1, int j0, int j1, int k0, int k1, int value) {
        for (int k = k0; k < k1; k++) {
            for (int j = j0; j < j1; j++) {
                for (int i = i0; i < i1; i++) {
                    lab[g.index(i, j, k)] = (byte) value;
                }
            }
        }
    }

    /** Sets {@code value} on voxels whose world centre lies within {@code r} mm of (cx, cy, cz). */
    static void fillBall(Grid3 g, byte[] lab, double cx, double cy, double cz, double r, int value) {
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] w = g.worldOf(i, j, k);
                    double dx = w[0] - cx;
                    double dy = w[1] - cy;
                    double dz = w[2] - cz;
                    if (dx * dx + dy * dy + dz * dz <= r * r) {
                        lab[g.index(i, j, k)] = (byte) value;
                    }
                }
            }
        }
    }

    /** Sum of element volumes (mm³) and the smallest one. */
    static double[] volumeAndMin(HexMesh mesh) {
        double[] jac = new double[9];
        double sum = 0;
        double min = Double.POSITIVE_INFINITY;
        for (int e = 0; e < mesh.elementCount(); e++) {
            double v = TrilinearHex.volume(mesh.hex(), e, mesh.xyzMm(), jac);
            sum += v;
            min = Math.min(min, TrilinearHex.minCornerDetJ(mesh.hex(), e, mesh.xyzMm(), jac));
        }
        return new double[] {sum, min};
    }
}
