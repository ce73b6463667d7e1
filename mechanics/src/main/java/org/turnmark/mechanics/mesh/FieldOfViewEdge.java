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

    /** Number of true entries. */
    public static int count(boolean[] flags) {
        int c = 0;
        for (boolean f : flags) {
            c += f ? 1 : 0;
        }
        return c;
    }
}
