package org.turnmark.mechanics.mesh;

import java.util.List;

import org.turnmark.geom.Grid3;

/**
 * The result of {@link LabelMesher}: the mesh and how it sits on its element lattice.
 *
 * @param mesh             the hexahedral mesh (world mm, RAS+), labels 1, 2, 3 or 5
 * @param nodeLattice      the lattice of candidate nodes: lattice point (a, b, c) is at
 *                         {@code nodeLattice.worldOf(a, b, c)}; element cells lie between lattice points
 * @param elementCell      per element, the flat index {@code a + ca*(b + cb*c)} of its lattice cell,
 *                         where (ca, cb) = (nodeLattice.nx() − 1, nodeLattice.ny() − 1)
 * @param nodeLatticePoint per node, its flat index in {@code nodeLattice}
 * @param labelCounts      number of elements per label, indexed by label 0..5 (0 and 4 are zero)
 * @param componentSizes   element counts of the face-connected tissue pieces found, largest first
 *                         (before any were dropped)
 * @param warnings         human-readable notes (dropped pieces); empty if none
 */
public record LabelMesh(HexMesh mesh, Grid3 nodeLattice, int[] elementCell, int[] nodeLatticePoint,
                        int[] labelCounts, int[] componentSizes, List<String> warnings) {

    /** Total tissue volume (mm³) of the mesh, by exact quadrature of each element. */
    public double volumeMm3() {
        double[] jac = new double[9];
        double v = 0;
        for (int e = 0; e < mesh.elementCount(); e++) {
            v += TrilinearHex.volume(mesh.hex(), e, mesh.xyzMm(), jac);
        }
        return v;
    }
}
