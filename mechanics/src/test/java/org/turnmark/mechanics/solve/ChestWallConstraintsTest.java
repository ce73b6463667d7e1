package org.turnmark.mechanics.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;
import org.turnmark.mechanics.mesh.ChestWallBoundary;
import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.mechanics.mesh.MeshSurface;

/**
 * The chest-wall rule on a box whose bottom face (z = 0) is the chest wall with normal +z: the
 * expected kinds are counted by hand from the box's node lattice (closed form).
 */
class ChestWallConstraintsTest {

    private static final int NX = 4;
    private static final int NY = 4;
    private static final int NZ = 2;

    /** Bottom-face nodes: (NX+1)(NY+1) = 25; its perimeter (the rim): 2(NX+NY) = 16; interior 9. */
    private static ChestWallBoundary.ChestWall bottomWall(int zeroNormalNode) {
        int count = (NX + 1) * (NY + 1);
        int[] nodes = new int[count];
        double[] normals = new double[3 * count];
        int w = 0;
        for (int j = 0; j <= NY; j++) {
            for (int i = 0; i <= NX; i++) {
                nodes[w] = TestMeshes.node(NX, NY, i, j, 0);
                normals[3 * w + 2] = nodes[w] == zeroNormalNode ? 0 : 1;
                w++;
            }
        }
        return new ChestWallBoundary.ChestWall(nodes, normals, 1, 1, 1);
    }

    @Test
    void slidingFixesRimAndUnresolvedNormalsAndSlidesTheRest() {
        HexMesh mesh = TestMeshes.box(NX, NY, NZ, 40, 40, 20);
        int unresolved = TestMeshes.node(NX, NY, 2, 2, 0);
        NodeConstraints bc = ChestWallConstraints.of(mesh, MeshSurface.of(mesh), bottomWall(unresolved), true);
        assertEquals(16 + 1, bc.count(NodeConstraints.Kind.FIXED));
        assertEquals(9 - 1, bc.count(NodeConstraints.Kind.SLIDING));
        assertEquals(NodeConstraints.Kind.FIXED, bc.kind(TestMeshes.node(NX, NY, 0, 3, 0)));
        assertEquals(NodeConstraints.Kind.FIXED, bc.kind(unresolved));
        int inner = TestMeshes.node(NX, NY, 1, 3, 0);
        assertEquals(NodeConstraints.Kind.SLIDING, bc.kind(inner));
        double[] n = new double[3];
        bc.normal(inner, n);
        assertArrayEquals(new double[] {0, 0, 1}, n, 0.0);
        assertEquals(NodeConstraints.Kind.FREE, bc.kind(TestMeshes.node(NX, NY, 2, 2, 1)));
    }

    @Test
    void fixedWallFixesEveryWallNode() {
        HexMesh mesh = TestMeshes.box(NX, NY, NZ, 40, 40, 20);
        NodeConstraints bc = ChestWallConstraints.of(mesh, MeshSurface.of(mesh), bottomWall(-1), false);
        assertEquals(25, bc.count(NodeConstraints.Kind.FIXED));
        assertEquals(0, bc.count(NodeConstraints.Kind.SLIDING));
    }
}
