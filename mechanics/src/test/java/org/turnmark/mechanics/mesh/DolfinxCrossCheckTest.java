package org.turnmark.mechanics.mesh;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.mechanics.element.HexFormulation;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.solve.HyperelasticSolver;
import org.turnmark.mechanics.solve.NodeConstraints;
import org.turnmark.mechanics.solve.SolveResult;
import org.turnmark.mechanics.solve.SolverConfig;

/**
 * Cross-check against a general-purpose finite-element library: the committed script
 * {@code src/test/resources/dolfinx/make_voxel_body_fixture.py} (Debian python3-dolfinx 0.5.2,
 * FEniCSx) solved a voxel body under gravity with Q1 hexahedra, 2×2×2 Gauss points and the same
 * compressible neo-Hookean energy; its nodal displacements are in {@code voxel_body_gravity.txt}. Here
 * the same label mask goes through {@link LabelMesher} (one element per voxel, so the node coordinates
 * are identical) and the project's solver with the plain Q1 formulation.
 */
class DolfinxCrossCheckTest {

    /**
     * Both codes solve the same discrete equations (same nodes, Q1 shape functions, 2×2×2 Gauss points,
     * energy and consistent body force), each with Newton's method run to quadratic convergence
     * (relative force residual ≤ 1e-11 here, 1e-13 in the script, direct/1e-13 linear solves), so they
     * agree to round-off of the discrete solution: observed 2e-15 mm on 6.4 mm. The bound 1e-9 mm
     * allows linear-solver tolerance 1e-13 times a tangent condition number up to ~1e4 on 6 mm.
     */
    private static final double SAME_DISCRETE_PROBLEM_MM = 1e-9;

    @Test
    void gravityLoadedVoxelBodyMatchesDolfinx() throws IOException {
        Path fixture = Path.of("src/test/resources/dolfinx/voxel_body_gravity.txt");
        List<String> lines = Files.readAllLines(fixture, StandardCharsets.US_ASCII);
        Map<String, Double> p = new HashMap<>();
        Map<String, double[]> ref = new HashMap<>();
        for (String l : lines) {
            String[] t = l.trim().split("\\s+");
            if (l.startsWith("# h_mm")) {
                for (int i = 1; i + 1 < t.length; i += 2) {
                    if (t[i].equals("g_m_s2")) {
                        p.put("gx", Double.parseDouble(t[i + 1]));
                        p.put("gy", Double.parseDouble(t[i + 2]));
                        p.put("gz", Double.parseDouble(t[i + 3]));
                        i += 2;
                    } else {
                        p.put(t[i], Double.parseDouble(t[i + 1]));
                    }
                }
            } else if (!l.startsWith("#") && t.length == 6) {
                ref.put(key(Double.parseDouble(t[0]), Double.parseDouble(t[1]), Double.parseDouble(t[2])),
                        new double[] {Double.parseDouble(t[3]), Double.parseDouble(t[4]), Double.parseDouble(t[5])});
            }
        }
        double h = p.get("h_mm");
        // Same mask as the script: block of 4 x 4 x 3 voxels and a bump at (1, 2, 3), here with one voxel
        // of air around it; voxel (1, 1, 1) spans [0, h] mm on each axis.
        Grid3 g = Grid3.axisAligned(6, 6, 6, h, h, h, -h / 2, -h / 2, -h / 2);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBox(g, lab, 1, 5, 1, 5, 1, 4, 1);
        lab[g.index(2, 3, 4)] = 1;
        HexMesh mesh = LabelMesher.mesh(g, lab, MesherConfig.of(h)).mesh();
        assertEquals(49, mesh.elementCount());
        assertEquals(ref.size(), mesh.nodeCount(), "same node set as the fixture");

        NodeConstraints bc = new NodeConstraints(mesh.nodeCount());
        double[] x = mesh.xyzMm();
        for (int n = 0; n < mesh.nodeCount(); n++) {
            assertTrue(ref.containsKey(key(x[3 * n], x[3 * n + 1], x[3 * n + 2])), "node " + n + " in fixture");
            if (x[3 * n + 2] == 0) {
                bc.fix(n);
            }
        }
        MaterialTable mats = MaterialTable.uniform(
                NeoHookeanMaterial.ofMuNu(p.get("mu_kpa"), p.get("nu"), p.get("rho_kg_m3")));
        SolverConfig cfg = SolverConfig.defaults().withFormulation(HexFormulation.STANDARD_Q1)
                .withTolerances(1e-11, 1e-20).withLinearSolver(SolverConfig.defaults().linearSolver(), 1e-13);
        SolveResult r = HyperelasticSolver.solve(mesh, mats, bc, new double[] {p.get("gx"), p.get("gy"), p.get("gz")},
                cfg, Progress.NONE, null);
        double maxRef = 0;
        for (int n = 0; n < mesh.nodeCount(); n++) {
            double[] e = ref.get(key(x[3 * n], x[3 * n + 1], x[3 * n + 2]));
            for (int c = 0; c < 3; c++) {
                assertEquals(e[c], r.u()[3 * n + c], SAME_DISCRETE_PROBLEM_MM, "node " + n + " component " + c);
                maxRef = Math.max(maxRef, Math.abs(e[c]));
            }
        }
        assertTrue(maxRef > 5, "the load is not trivial: max displacement " + maxRef + " mm");
    }

    private static String key(double x, double y, double z) {
        return Math.round(x * 10) + "," + Math.round(y * 10) + "," + Math.round(z * 10);
    }
}
