package org.turnmark.mechanics.mesh;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;

/**
 * Mesh nodes where tissue is cut by the image's field of view. The body goes on beyond the image, so a
 * tissue face on the image boundary is a cut, not a free surface: left free, a strip of torso skin or fat
 * cut by the field of view hangs under gravity like a flap, which no body does. Such nodes are held in
 * place as the tissue beyond the image would hold them (the usual way a model region is cut out of a larger
 * body: a Dirichlet condition on the cut).
 *
 * <p>A node is on the cut when its voxel coordinate along some axis is at or beyond the outer face of the
 * image (−½ or n − ½, to {@link #TOLERANCE_VOXELS}). {@link LabelMesher}'s lattice starts on the outer
 * face of voxel (0, 0, 0), so the low faces are met exactly; at the high faces a boundary cell may reach
 * past the image, and its outer nodes count as on the cut.
 */
public final class FieldOfViewEdge {

    /** Tolerance of "on the image face", in voxels (round-off of the lattice's world positions). */
    public static final double TOLERANCE_VOXELS = 1e-6;

    private FieldOfViewEdge() {
    }

    /**
     * Flags the nodes of {@code mesh} on or beyond the outer faces of {@code grid}.
     *
     * @param mesh a mesh in the configuration the image shows
     * @param grid the image grid the mesh was built from
     * @return per node, true on the cut
     */
    public static boolean[] cutNodes(HexMesh mesh, Grid3 grid) {
        Affine3D w2v = grid.worldToVoxel();
        double[] xyz = mesh.xyzMm();
        int[] n = {grid.nx(), grid.ny(), grid.nz()};
        boolean[] cut = new boolean[mesh.nodeCount()];
        double[] p = new double[3];
        double[] v = new double[3];
        for (int i = 0; i < cut.length; i++) {
            System.arraycopy(xyz, 3 * i, p, 0, 3);
            w2v.applyPoint(p, v);
            for (int a = 0; a < 3; a++) {
                if (v[a] <= -0.5 + TOLERANCE_VOXELS || v[a] >= n[a] - 0.5 - TOLERANCE_VOXELS) {
                    cut[i] = true;
                    break;
                }
            }
        }
        return cut;
    }

    /**
     * For each node on the cut, its straight-line distance to the nearest of {@code wallNodes}, the
     * chest-wall contact (mm); NaN for nodes not on the cut, and +∞ on the cut when there is no wall node.
     * A cut through the torso's skin and fat lies within their thickness of the chest wall; a cut further
     * out goes through the breast itself.
     *
     * @param mesh      the mesh
     * @param cut       per node, on the cut ({@link #cutNodes})
     * @param wallNodes node indices of the chest-wall contact
     * @return per node, mm
     */
    public static double[] distanceFromWallMm(HexMesh mesh, boolean[] cut, int[] wallNodes) {
        if (cut.length != mesh.nodeCount()) {
            throw new IllegalArgumentException("cut flags: expected " + mesh.nodeCount() + " entries, got "
                    + cut.length);
        }
        double[] xyz = mesh.xyzMm();
        double[] d = new double[cut.length];
        for (int i = 0; i < cut.length; i++) {
            if (!cut[i]) {
                d[i] = Double.NaN;
                continue;
            }
            double best = Double.POSITIVE_INFINITY;
            for (int w : wallNodes) {
                double dx = xyz[3 * w] - xyz[3 * i];
                double dy = xyz[3 * w + 1] - xyz[3 * i + 1];
                double dz = xyz[3 * w + 2] - xyz[3 * i + 2];
                best = Math.min(best, dx * dx + dy * dy + dz * dz);
            }
            d[i] = Math.sqrt(best);
        }
        return d;
    }

    /** Number of true entries. */
    public static int count(boolean[] flags) {
        int c = 0;
        for (boolean f : flags) {
            c += f ? 1 : 0;
        }
        return c;
    }
}
