package org.turnmark.mechanics.solve;

import org.turnmark.mechanics.mesh.ChestWallBoundary;
import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.mechanics.mesh.MeshSurface;

/**
 * The chest-wall boundary condition: chest-wall nodes fixed, or sliding on the wall's normal. When
 * sliding, the rim of the contact (chest-wall nodes that also lie on the free surface, where the
 * breast base meets the torso skin; {@link ChestWallBoundary.ChestWall#rim}) and nodes without a
 * resolved normal stay fixed: this anchors the base as the surrounding skin does and removes the
 * rigid slide and spin a flat or rotationally symmetric chest wall would otherwise leave free.
 * Stateless.
 */
public final class ChestWallConstraints {

    private ChestWallConstraints() {
    }

    /** The constraints for {@code mesh}, with the rim taken from its boundary {@code surface}. */
    public static NodeConstraints of(HexMesh mesh, MeshSurface surface, ChestWallBoundary.ChestWall wall,
                                     boolean sliding) {
        int n = mesh.nodeCount();
        return of(n, wall, wall.rim(surface, n), sliding);
    }

    /**
     * The constraints for a mesh of {@code nodeCount} nodes with a rim already found.
     *
     * @param rim per node, true on the rim of the contact (length {@code nodeCount})
     */
    public static NodeConstraints of(int nodeCount, ChestWallBoundary.ChestWall wall, boolean[] rim,
                                     boolean sliding) {
        NodeConstraints bc = new NodeConstraints(nodeCount);
        int[] nodes = wall.nodes();
        double[] nrm = wall.normals();
        for (int i = 0; i < nodes.length; i++) {
            double nx = nrm[3 * i];
            double ny = nrm[3 * i + 1];
            double nz = nrm[3 * i + 2];
            if (!sliding || rim[nodes[i]] || (nx == 0 && ny == 0 && nz == 0)) {
                bc.fix(nodes[i]);
            } else {
                bc.slide(nodes[i], nx, ny, nz);
            }
        }
        return bc;
    }
}
