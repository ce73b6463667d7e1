package org.turnmark.mechanics.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.mechanics.bench.VoxelBreast;
import org.turnmark.mechanics.element.HexFormulation;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.mesh.HexMesh;

class UpperFloatMatrixTest {

    /**
     * The symmetric single-precision product equals the full double-precision product of the same
     * (symmetric) tangent up to the rounding of the entries: |Ãx − Ax|_i ≤ Σ_j |a_ij||x_j|·2⁻²⁴
     * (float rounding, relative 6e−8) plus double round-off, bounded here by 1e−6 of Σ_j |a_ij||x_j|.
     * The mesh has several chunks of rows, so products across chunk buffers are exercised.
     */
    @Test
    void equalsTheFullProductUpToFloatRounding() {
        FeSystem sys = tangent(VoxelBreast.halfEllipsoid(40, 30, 35, 3, true));
        BlockCsr a = sys.k;
        assertTrue(a.rows > 2 * UpperFloatMatrix.CHUNK_ROWS, "needs three or more chunks, has " + a.rows + " rows");
        UpperFloatMatrix f = new UpperFloatMatrix(a);
        f.refresh();
        assertEquals((a.col.length + a.rows) / 2, f.storedBlocks(), "diagonal plus upper triangle");
        double[] x = TestMeshes.randomVector(new Random(3), a.size());
        double[] y = new double[a.size()];
        double[] yf = new double[a.size()];
        a.multiply(x, y);
        f.multiply(x, yf);
        double[] absX = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            absX[i] = Math.abs(x[i]);
        }
        BlockCsr abs = new BlockCsr(a.rows, 3, a.rowPtr, a.col);
        for (int i = 0; i < a.val.length; i++) {
            abs.val[i] = Math.abs(a.val[i]);
        }
        double[] bound = new double[a.size()];
        abs.multiply(absX, bound);
        for (int i = 0; i < y.length; i++) {
            assertEquals(y[i], yf[i], 1e-6 * bound[i], "component " + i);
        }
    }

    /** The chunked product is bit-identical for one and two threads. */
    @Test
    void bitIdenticalForOneAndTwoThreads() throws Exception {
        FeSystem sys = tangent(VoxelBreast.halfEllipsoid(40, 30, 35, 3, true));
        UpperFloatMatrix f = new UpperFloatMatrix(sys.k);
        f.refresh();
        double[] x = TestMeshes.randomVector(new Random(4), sys.k.size());
        double[] y1 = new double[x.length];
        double[] y2 = new double[x.length];
        new java.util.concurrent.ForkJoinPool(1).submit(() -> f.multiply(x, y1)).get();
        new java.util.concurrent.ForkJoinPool(2).submit(() -> f.multiply(x, y2)).get();
        assertArrayEquals(y1, y2);
    }

    private static FeSystem tangent(HexMesh mesh) {
        FeSystem sys = new FeSystem(mesh, MaterialTable.DEFAULTS, HexFormulation.MEAN_DILATATION);
        int n = 3 * mesh.nodeCount();
        double[] u = TestMeshes.randomVector(new Random(2), n);
        for (int i = 0; i < n; i++) {
            u[i] *= 0.2;   // a deformed state: the tangent has non-trivial values everywhere
        }
        sys.assemble(u, new double[n], true, new double[1]);
        return sys;
    }
}
