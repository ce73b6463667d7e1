package org.turnmark.mechanics.mesh;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;

class DisplacementFieldSamplerTest {

    /** Components are stored as float: relative rounding 2⁻²⁴ on displacements of a few mm. */
    private static final double FLOAT_MM = 1e-5;

    /**
     * Two raster passes find the nearest inside voxel exactly next to the surface and to within a
     * fraction of a voxel farther out (sequential distance-transform propagation, Danielsson 1980);
     * bound used: a quarter of the largest spacing (2.4 mm here).
     */
    private static final double NEAREST_DISTANCE_SLACK_MM = 0.6;

    private static HexMesh ball() {
        Grid3 g = Grid3.axisAligned(40, 40, 40, 1, 1, 1, -20, -20, -20);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBall(g, lab, 0, 0, 0, 14, 1);
        return LabelMesher.mesh(g, lab, MesherConfig.of(4)).mesh();
    }

    private static double[] sag(HexMesh mesh) {
        double[] x = mesh.xyzMm();
        double[] u = new double[x.length];
        for (int n = 0; n < x.length / 3; n++) {
            double r2 = x[3 * n] * x[3 * n] + x[3 * n + 2] * x[3 * n + 2];
            u[3 * n + 1] = -4 * Math.exp(-r2 / 200);
            u[3 * n] = 0.03 * x[3 * n + 1];
        }
        return u;
    }

    @Test
    void fieldOnObliqueGridMatchesPointMapVoxelByVoxel() {
        HexMesh mesh = ball();
        PointMap map = ConfigurationMap.inverse(mesh, sag(mesh));
        // An oblique, left-handed, anisotropic grid unrelated to the mesh lattice (odd sizes).
        Affine3D v2w = Affine3D.translation(-19, -21, -18)
                .compose(Affine3D.rotation(1, -1, 2, Math.toRadians(23)))
                .compose(new Affine3D(-1.3, 0, 0, 38, 0, 1.1, 0, 0, 0, 0, 1.7, 0));
        Grid3 grid = new Grid3(31, 37, 23, v2w);
        DenseDisplacement f = DisplacementFieldSampler.sample(map, grid, DenseDisplacement.Extrapolation.zero());
        PointMap.Evaluator ev = map.evaluator();
        double[] out = new double[3];
        int inside = 0;
        for (int k = 0; k < grid.nz(); k++) {
            for (int j = 0; j < grid.ny(); j++) {
                for (int i = 0; i < grid.nx(); i++) {
                    int v = grid.index(i, j, k);
                    double[] p = grid.worldOf(i, j, k);
                    boolean in = ev.map(p[0], p[1], p[2], out);
                    assertEquals(in ? 1 : 0, f.inside()[v]);
                    if (in) {
                        inside++;
                        assertEquals(out[0] - p[0], f.ux()[v], FLOAT_MM);
                        assertEquals(out[1] - p[1], f.uy()[v], FLOAT_MM);
                        assertEquals(out[2] - p[2], f.uz()[v], FLOAT_MM);
                    } else {
                        assertEquals(0f, f.ux()[v]);
                        assertEquals(0f, f.uy()[v]);
                        assertEquals(0f, f.uz()[v]);
                    }
                }
            }
        }
        assertEquals(inside, f.insideCount());
        assertTrue(inside > 1000 && inside < grid.size() / 2, "non-trivial mask: " + inside);
    }

    @Test
    void nearestDecayExtendsFromTheClosestInsideVoxel() {
        HexMesh mesh = ball();
        double[] u = new double[mesh.xyzMm().length];
        for (int n = 0; n < u.length / 3; n++) {
            u[3 * n] = 1.5;
            u[3 * n + 1] = -2.5;
            u[3 * n + 2] = 0.75;
        }
        PointMap map = ConfigurationMap.forward(mesh, u);
        Grid3 grid = Grid3.axisAligned(21, 19, 17, 2, 2.2, 2.4, -20, -20, -20);
        double decay = 5;
        DenseDisplacement f = DisplacementFieldSampler.sample(map, grid,
                DenseDisplacement.Extrapolation.nearestDecay(decay));
        int checked = 0;
        for (int v = 0; v < grid.size(); v++) {
            if (f.inside()[v] != 0) {
                assertEquals(1.5, f.ux()[v], FLOAT_MM);
                continue;
            }
            // Brute-force nearest inside voxel (closed form of the policy for a translation).
            double[] p = grid.worldOf(v % 21, (v / 21) % 19, v / (21 * 19));
            double best = Double.POSITIVE_INFINITY;
            for (int s = 0; s < grid.size(); s++) {
                if (f.inside()[s] != 0) {
                    double[] q = grid.worldOf(s % 21, (s / 21) % 19, s / (21 * 19));
                    double d2 = (p[0] - q[0]) * (p[0] - q[0]) + (p[1] - q[1]) * (p[1] - q[1])
                            + (p[2] - q[2]) * (p[2] - q[2]);
                    best = Math.min(best, d2);
                }
            }
            // Closed form of the policy for a translation: u = c·exp(−(d/L)²), direction exactly c.
            double w = f.ux()[v] / 1.5;
            assertTrue(w > 0 && w <= 1, "weight " + w);
            assertEquals(-2.5 * w, f.uy()[v], FLOAT_MM);
            assertEquals(0.75 * w, f.uz()[v], FLOAT_MM);
            double dMin = Math.sqrt(best);
            double dGot = Math.sqrt(-Math.log(w)) * decay;
            double slack = dMin <= 2.5 ? 0 : NEAREST_DISTANCE_SLACK_MM;
            // float rounding of w near 1 gives ~1e-3 mm on d; far out it is w's own relative rounding.
            assertTrue(dGot >= dMin - 2e-3 && dGot <= dMin + slack + 2e-3,
                    "distance " + dGot + " mm vs nearest " + dMin + " mm");
            checked++;
        }
        assertTrue(checked > 1000 && f.insideCount() > 100);
    }
}
