package org.turnmark.mechanics.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.mechanics.bench.VoxelBreast;
import org.turnmark.mechanics.element.HexFormulation;
import org.turnmark.mechanics.element.HexKernel;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.mesh.HexMesh;

class AssemblyTest {

    /**
     * The coloured block assembly equals a naive element-by-element assembly into a dense matrix:
     * both add the same terms, only in a different order, so they agree to round-off (1e−12 of the
     * largest entry).
     */
    @Test
    void colouredBlockAssemblyEqualsNaiveAssembly() {
        HexMesh mesh = VoxelBreast.halfEllipsoid(14, 10, 12, 4, true);
        FeSystem sys = new FeSystem(mesh, MaterialTable.DEFAULTS, HexFormulation.MEAN_DILATATION);
        int n = 3 * mesh.nodeCount();
        double[] u = new double[n];
        Random rnd = new Random(21);
        for (int i = 0; i < n; i++) {
            u[i] = 0.2 * (rnd.nextDouble() - 0.5);
        }
        double[] fint = new double[n];
        double[] detF = new double[1];
        double w = sys.assemble(u, fint, true, detF);

        double[] kDense = new double[n * n];
        double[] fNaive = new double[n];
        double wNaive = 0;
        HexKernel kernel = new HexKernel();
        double[] ue = new double[24];
        double[] fe = new double[24];
        double[] ke = new double[576];
        int[] hex = mesh.hex();
        for (int e = 0; e < mesh.elementCount(); e++) {
            for (int a = 0; a < 8; a++) {
                for (int i = 0; i < 3; i++) {
                    ue[3 * a + i] = u[3 * hex[8 * e + a] + i];
                }
            }
            wNaive += kernel.evaluate(sys.geo, e, ue, sys.mu[e], sys.kappa[e], sys.form, fe, ke);
            for (int a = 0; a < 8; a++) {
                for (int i = 0; i < 3; i++) {
                    int r = 3 * hex[8 * e + a] + i;
                    fNaive[r] += fe[3 * a + i];
                    for (int b = 0; b < 8; b++) {
                        for (int k = 0; k < 3; k++) {
                            kDense[n * r + 3 * hex[8 * e + b] + k] += ke[24 * (3 * a + i) + 3 * b + k];
                        }
                    }
                }
            }
        }
        double maxK = 0;
        double maxF = 0;
        for (double v : kDense) {
            maxK = Math.max(maxK, Math.abs(v));
        }
        for (double v : fNaive) {
            maxF = Math.max(maxF, Math.abs(v));
        }
        assertEquals(wNaive, w, 1e-12 * Math.abs(wNaive));
        for (int i = 0; i < n; i++) {
            assertEquals(fNaive[i], fint[i], 1e-12 * maxF);
        }
        BlockCsr k = sys.k;
        for (int r = 0; r < mesh.nodeCount(); r++) {
            for (int c = 0; c < mesh.nodeCount(); c++) {
                int pos = k.find(r, c);
                for (int i = 0; i < 3; i++) {
                    for (int j = 0; j < 3; j++) {
                        double expected = kDense[n * (3 * r + i) + 3 * c + j];
                        double actual = pos < 0 ? 0 : k.val[9 * pos + 3 * i + j];
                        assertEquals(expected, actual, 1e-12 * maxK, "block " + r + "," + c);
                    }
                }
            }
        }
    }
}
