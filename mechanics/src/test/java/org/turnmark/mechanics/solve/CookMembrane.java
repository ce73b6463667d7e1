package org.turnmark.mechanics.solve;

import org.turnmark.geom.Progress;
import org.turnmark.mechanics.element.HexFormulation;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.HexMesh;

/**
 * Cook's membrane in plane strain: the quadrilateral (0,0), (48,44), (48,60), (0,44) mm, 1 mm
 * thick, one element through the thickness with u_z = 0 at every node, clamped at x = 0, a dead
 * shear traction totalling 1 N (1000 mN) in +y on the 16 mm² face x = 48. The N × N mesh is the
 * bilinear image of a uniform grid of the unit square.
 */
final class CookMembrane {

    private CookMembrane() {
    }

    static int node(int n, int i, int j, int k) {
        return i + (n + 1) * (j + (n + 1) * k);
    }

    static HexMesh mesh(int n) {
        double[] xyz = new double[3 * (n + 1) * (n + 1) * 2];
        for (int k = 0; k <= 1; k++) {
            for (int j = 0; j <= n; j++) {
                for (int i = 0; i <= n; i++) {
                    double s = (double) i / n;
                    double t = (double) j / n;
                    int q = node(n, i, j, k);
                    xyz[3 * q] = 48 * s;
                    xyz[3 * q + 1] = 44 * s + 44 * t - 28 * s * t;
                    xyz[3 * q + 2] = k;
                }
            }
        }
        int[] hex = new int[8 * n * n];
        int[] label = new int[n * n];
        int e = 0;
        for (int j = 0; j < n; j++) {
            for (int i = 0; i < n; i++) {
                int[] c = {node(n, i, j, 0), node(n, i + 1, j, 0), node(n, i + 1, j + 1, 0), node(n, i, j + 1, 0),
                        node(n, i, j, 1), node(n, i + 1, j, 1), node(n, i + 1, j + 1, 1), node(n, i, j + 1, 1)};
                System.arraycopy(c, 0, hex, 8 * e, 8);
                label[e++] = 1;
            }
        }
        return new HexMesh(xyz, hex, label);
    }

    /** Vertical displacement of the tip (48, 60) mm, mean of the two nodes through the thickness, mm. */
    static double tipUy(int n, double nu, HexFormulation form) {
        return tipUy(n, nu, form, true);
    }

    /**
     * As {@link #tipUy(int, double, HexFormulation)}. Without plane strain the face z = 1 is free and
     * z = 0 is a symmetry plane (u_z = 0): the symmetric half of a plate with traction-free faces.
     */
    static double tipUy(int n, double nu, HexFormulation form, boolean planeStrain) {
        HexMesh mesh = mesh(n);
        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        for (int k = 0; k <= 1; k++) {
            for (int j = 0; j <= n; j++) {
                for (int i = 0; i <= n; i++) {
                    if (i == 0) {
                        bc.fix(node(n, i, j, k));
                    } else if (planeStrain || k == 0) {
                        bc.slide(node(n, i, j, k), 0, 0, 1);
                    }
                }
            }
        }
        // uniform dead traction 1000 mN / 16 mm²; each face quad (height 16/n, depth 1) gives a
        // quarter of its force to each of its four nodes (exact for a uniform load on a rectangle)
        double[] loads = new double[3 * mesh.nodeCount()];
        double quadForce = 1000.0 / n;
        for (int j = 0; j < n; j++) {
            for (int k = 0; k <= 1; k++) {
                loads[3 * node(n, n, j, k) + 1] += quadForce / 4;
                loads[3 * node(n, n, j + 1, k) + 1] += quadForce / 4;
            }
        }
        MaterialTable mats = MaterialTable.uniform(NeoHookeanMaterial.ofMuNu(422.5, nu, 1000));
        SolverConfig cfg = SolverConfig.defaults().withFormulation(form).withNodalForces(loads).withLoadSteps(5)
                .withTolerances(1e-8, 1e-14);
        SolveResult r = HyperelasticSolver.solve(mesh, mats, bc, new double[3], cfg, Progress.NONE, null);
        return 0.5 * (r.u()[3 * node(n, n, n, 0) + 1] + r.u()[3 * node(n, n, n, 1) + 1]);
    }
}
