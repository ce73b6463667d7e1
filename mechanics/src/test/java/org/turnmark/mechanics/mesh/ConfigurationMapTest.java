package org.turnmark.mechanics.mesh;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;

class ConfigurationMapTest {

    /**
     * Newton stops at a local step of 1e-12 (about 1e-11 mm on 4 mm elements) and converges
     * quadratically, so a round trip is exact to ~1e-10 mm.
     */
    private static final double ROUND_TRIP_MM = 1e-8;

    private static LabelMesh ballMesh() {
        Grid3 g = Grid3.axisAligned(40, 40, 40, 1, 1, 1, -20, -20, -20);
        byte[] lab = new byte[g.size()];
        LabelVolumes.fillBall(g, lab, 0, 0, 0, 15, 2);
        return LabelMesher.mesh(g, lab, MesherConfig.of(4));
    }

    /** A smooth, non-affine, orientation-preserving displacement (mm) of moderate size. */
    private static double[] bend(HexMesh mesh) {
        double[] x = mesh.xyzMm();
        double[] u = new double[x.length];
        for (int n = 0; n < x.length / 3; n++) {
            double px = x[3 * n];
            double py = x[3 * n + 1];
            double pz = x[3 * n + 2];
            u[3 * n] = 2 * Math.sin(py / 10) + 0.05 * px;
            u[3 * n + 1] = 0.002 * px * px - 3;
            u[3 * n + 2] = 1.5 * Math.cos(px / 12) * Math.sin(pz / 15);
        }
        return u;
    }

    @Test
    void locatorFindsEveryElementCentreAndRejectsFarPoints() {
        LabelMesh lm = ballMesh();
        HexMesh mesh = lm.mesh();
        HexLocator loc = new HexLocator(mesh);
        double[] rst = new double[3];
        double[] work = new double[12];
        double[] c = new double[3];
        for (int e = 0; e < mesh.elementCount(); e++) {
            TrilinearHex.interpolate(mesh.hex(), e, mesh.xyzMm(), 0.5, 0.5, 0.5, c);
            assertEquals(e, loc.locate(c[0], c[1], c[2], rst, work));
            assertEquals(0.5, rst[0], 1e-12);
        }
        assertEquals(HexLocator.OUTSIDE, loc.locate(100, 0, 0, rst, work));
        assertEquals(HexLocator.OUTSIDE, loc.locate(Double.NaN, 0, 0, rst, work));
        // Just outside the ball's staircase along +x from its rightmost node.
        double maxX = Double.NEGATIVE_INFINITY;
        for (int n = 0; n < mesh.nodeCount(); n++) {
            maxX = Math.max(maxX, mesh.xyzMm()[3 * n]);
        }
        assertEquals(HexLocator.OUTSIDE, loc.locate(maxX + 0.01, 0.1, 0.1, rst, work));
    }

    @Test
    void locatorMatchesBruteForceSearchOnRandomPoints() {
        LabelMesh lm = ballMesh();
        HexMesh mesh = lm.mesh();
        double[] def = ConfigurationMap.displaced(mesh, bend(mesh));
        HexLocator loc = new HexLocator(mesh.hex(), def);
        Random rnd = new Random(11);
        double[] rst = new double[3];
        double[] work = new double[12];
        double[] rst2 = new double[3];
        int inside = 0;
        for (int q = 0; q < 3000; q++) {
            double x = -22 + 44 * rnd.nextDouble();
            double y = -25 + 44 * rnd.nextDouble();
            double z = -22 + 44 * rnd.nextDouble();
            int got = loc.locate(x, y, z, rst, work);
            int brute = HexLocator.OUTSIDE;
            for (int e = 0; e < mesh.elementCount() && brute < 0; e++) {
                if (TrilinearHex.invert(mesh.hex(), e, def, x, y, z, rst2, work)
                        && rst2[0] >= 0 && rst2[0] <= 1 && rst2[1] >= 0 && rst2[1] <= 1
                        && rst2[2] >= 0 && rst2[2] <= 1) {
                    brute = e;
                }
            }
            assertEquals(brute, got, "point " + x + ", " + y + ", " + z);
            inside += got >= 0 ? 1 : 0;
        }
        assertTrue(inside > 300, "enough points fall inside to make the test meaningful: " + inside);
    }

    @Test
    void forwardThenInverseIsIdentityAndOutsideIsExplicit() {
        LabelMesh lm = ballMesh();
        HexMesh mesh = lm.mesh();
        double[] u = bend(mesh);
        PointMap fwd = ConfigurationMap.forward(mesh, u);
        PointMap inv = ConfigurationMap.inverse(mesh, u);
        PointMap.Evaluator f = fwd.evaluator();
        PointMap.Evaluator b = inv.evaluator();
        Random rnd = new Random(3);
        double[] y = new double[3];
        double[] back = new double[3];
        int tested = 0;
        for (int q = 0; q < 2000; q++) {
            double px = -16 + 32 * rnd.nextDouble();
            double py = -16 + 32 * rnd.nextDouble();
            double pz = -16 + 32 * rnd.nextDouble();
            if (!f.map(px, py, pz, y)) {
                continue;
            }
            assertTrue(b.map(y[0], y[1], y[2], back), "image of an inside point is inside the deformed mesh");
            assertEquals(px, back[0], ROUND_TRIP_MM);
            assertEquals(py, back[1], ROUND_TRIP_MM);
            assertEquals(pz, back[2], ROUND_TRIP_MM);
            tested++;
        }
        assertTrue(tested > 500, "non-trivial: " + tested);
        assertFalse(fwd.map(50, 50, 50).isPresent());
    }

    @Test
    void forwardReproducesNodalDisplacementsAndAffineFieldsExactly() {
        LabelMesh lm = ballMesh();
        HexMesh mesh = lm.mesh();
        // Trilinear interpolation reproduces an affine displacement exactly (patch-test property).
        Affine3D a = new Affine3D(1.1, 0.05, 0, 2, -0.02, 0.95, 0.1, -1, 0.03, 0, 1.02, 0.5);
        double[] x = mesh.xyzMm();
        double[] u = new double[x.length];
        for (int n = 0; n < mesh.nodeCount(); n++) {
            double[] p = a.applyPoint(x[3 * n], x[3 * n + 1], x[3 * n + 2]);
            for (int c = 0; c < 3; c++) {
                u[3 * n + c] = p[c] - x[3 * n + c];
            }
        }
        PointMap.Evaluator f = ConfigurationMap.forward(mesh, u).evaluator();
        double[] out = new double[3];
        Random rnd = new Random(5);
        int tested = 0;
        for (int q = 0; q < 1000; q++) {
            double px = -15 + 30 * rnd.nextDouble();
            double py = -15 + 30 * rnd.nextDouble();
            double pz = -15 + 30 * rnd.nextDouble();
            if (f.map(px, py, pz, out)) {
                double[] e = a.applyPoint(px, py, pz);
                for (int c = 0; c < 3; c++) {
                    assertEquals(e[c], out[c], 1e-10);
                }
                tested++;
            }
        }
        assertTrue(tested > 100);
    }

    @Test
    void compositionThroughReferenceEqualsDirectConfigurationMap() {
        LabelMesh lm = ballMesh();
        HexMesh mesh = lm.mesh();
        double[] uProne = bend(mesh);
        double[] uSupine = new double[uProne.length];
        for (int i = 0; i < uSupine.length; i++) {
            uSupine[i] = -0.7 * uProne[i] + (i % 3 == 2 ? 1.0 : 0.0);
        }
        PointMap composed = ConfigurationMap.inverse(mesh, uProne).andThen(ConfigurationMap.forward(mesh, uSupine));
        PointMap direct = new ConfigurationMap(mesh, ConfigurationMap.displaced(mesh, uProne),
                ConfigurationMap.displaced(mesh, uSupine));
        PointMap.Evaluator c = composed.evaluator();
        PointMap.Evaluator d = direct.evaluator();
        double[] a = new double[3];
        double[] b = new double[3];
        Random rnd = new Random(9);
        int tested = 0;
        for (int q = 0; q < 1000; q++) {
            double px = -16 + 32 * rnd.nextDouble();
            double py = -19 + 32 * rnd.nextDouble();
            double pz = -16 + 32 * rnd.nextDouble();
            boolean inC = c.map(px, py, pz, a);
            boolean inD = d.map(px, py, pz, b);
            assertEquals(inD, inC);
            if (inC) {
                for (int k = 0; k < 3; k++) {
                    assertEquals(b[k], a[k], ROUND_TRIP_MM);
                }
                tested++;
            }
        }
        assertTrue(tested > 200);
    }
}
