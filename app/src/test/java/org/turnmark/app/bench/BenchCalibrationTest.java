package org.turnmark.app.bench;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;

class BenchCalibrationTest {

    static final Path CASE = Path.of("..", "sample-cases", "phantom-priors-2");
    /** Exact data: the fit reproduces the map to round-off (mm, and per matrix entry). */
    static final double EXACT_TOL = 1e-9;
    /**
     * truth.json rounds the drawn angle to 0.01°; the displacements are quantised to 1/256 mm, which moves
     * a least-squares angle over thousands of points far less than that.
     */
    static final double ANGLE_TOL_DEG = 0.005 + 1e-3;
    /** Tilt out of the z rotation: below 1e-4 rad (0.006°), what 1/256 mm quantisation over ~16,000 voxels allows. */
    static final double TILT_TOL = 1e-4;

    @Test
    void kabschRecoversAKnownRigidMapExactly() {
        Random r = new Random(7);
        Affine3D truth = Affine3D.translation(4, -2, 9).compose(Affine3D.rotation(0.3, -0.5, 0.8, 0.2));
        List<double[]> from = new ArrayList<>();
        List<double[]> to = new ArrayList<>();
        for (int i = 0; i < 50; i++) {
            double[] x = {100 * r.nextDouble(), 100 * r.nextDouble(), 100 * r.nextDouble()};
            from.add(x);
            to.add(truth.applyPoint(x[0], x[1], x[2]));
        }
        Affine3D fit = BenchCalibration.kabsch(from, to);
        assertTrue(fit.maxAbsDifference(truth) < EXACT_TOL, fit + " vs " + truth);
    }

    @Test
    void kabschNeverReturnsAReflection() {
        // points mirrored in x: the best proper rotation, not the mirror (det +1)
        List<double[]> from = new ArrayList<>();
        List<double[]> to = new ArrayList<>();
        double[][] pts = {{1, 0, 0}, {0, 2, 0}, {0, 0, 3}, {1, 1, 1}, {-2, 1, 0}};
        for (double[] p : pts) {
            from.add(p);
            to.add(new double[] {-p[0], p[1], p[2]});
        }
        assertEquals(1, BenchCalibration.kabsch(from, to).determinant(), EXACT_TOL);
    }

    @Test
    void truePlacementOfTheBundledCaseIsItsRecordedTorsoRotation() throws Exception {
        Affine3D p = BenchCalibration.truePlacement(CASE);
        double[] m = p.toRowMajor();
        double angle = Math.toDegrees(Math.acos((m[0] + m[5] + m[10] - 1) / 2));
        JsonNode t = new ObjectMapper().readTree(Files.readString(CASE.resolve("truth").resolve("truth.json")));
        double recorded = t.path("truth_conditions").path("supine_torso_rotation_deg_about_z").asDouble(Double.NaN);
        assertEquals(recorded, angle, ANGLE_TOL_DEG);
        // a rotation about z: no coupling of z with x or y (entries are sines of tilt angles)
        for (int k : new int[] {2, 6, 8, 9}) {
            assertEquals(0, m[k], TILT_TOL, "entry " + k);
        }
    }
}
