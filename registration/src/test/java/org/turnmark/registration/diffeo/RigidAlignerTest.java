package org.turnmark.registration.diffeo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.registration.volume.Volume;

/**
 * Coarse-to-fine rigid alignment with a moving mask: two groups of invented Gaussian blobs, a "torso"
 * (y &lt; 0) and a "breast" (y &gt; 0), move differently between the images; restricted to the torso the
 * alignment recovers the torso's rigid motion, over the whole image the breast pulls it away.
 */
class RigidAlignerTest {

    private static final double VOXEL_MM = 2.0;
    /** A quarter voxel: sub-voxel accuracy is what rigid intensity alignment of textured images reaches (common practice). */
    private static final double MAX_RMS_MM = 0.25 * VOXEL_MM;
    private static final Grid3 GRID = Grid3.axisAligned(48, 48, 48, VOXEL_MM, VOXEL_MM, VOXEL_MM, -47, -47, -47);
    /** The torso's motion, fixed world → moving world: 3° about z through the origin and a shift. */
    private static final Affine3D TORSO = Affine3D.translation(2.0, -1.5, 3.0)
            .compose(Affine3D.rotation(0, 0, 1, Math.toRadians(3)));
    /** The breast's motion: a larger shift of its own. */
    private static final Affine3D BREAST = Affine3D.translation(-6, 4, 0);

    /** Blob centres (x, y, z) and amplitudes, seeded; torso blobs in y ∈ [−40, −6], breast in [6, 40]. */
    private static double[][] blobs(long seed, boolean torso) {
        SplittableRandom r = new SplittableRandom(seed);
        double[][] b = new double[40][];
        for (int i = 0; i < b.length; i++) {
            double y = torso ? r.nextDouble(-40, -6) : r.nextDouble(6, 40);
            b[i] = new double[] {r.nextDouble(-36, 36), y, r.nextDouble(-36, 36), r.nextDouble(50, 150)};
        }
        return b;
    }

    private static final double[][] TORSO_BLOBS = blobs(11, true);
    private static final double[][] BREAST_BLOBS = blobs(12, false);

    private static double sum(double[][] blobs, double[] p) {
        double v = 0;
        for (double[] b : blobs) {
            double dx = p[0] - b[0];
            double dy = p[1] - b[1];
            double dz = p[2] - b[2];
            v += b[3] * Math.exp(-(dx * dx + dy * dy + dz * dz) / (2 * 3.0 * 3.0));
        }
        return v;
    }

    /** Moving image: blobs where they are; fixed image: each group seen through its own motion. */
    private static Volume image(boolean fixed) {
        float[] d = new float[GRID.size()];
        for (int k = 0; k < GRID.nz(); k++) {
            for (int j = 0; j < GRID.ny(); j++) {
                for (int i = 0; i < GRID.nx(); i++) {
                    double[] y = GRID.worldOf(i, j, k);
                    double[] t = fixed ? TORSO.applyPoint(y[0], y[1], y[2]) : y;
                    double[] b = fixed ? BREAST.applyPoint(y[0], y[1], y[2]) : y;
                    d[GRID.index(i, j, k)] = (float) (10 + sum(TORSO_BLOBS, t) + sum(BREAST_BLOBS, b));
                }
            }
        }
        return new Volume(GRID, d);
    }

    /** Torso half of the moving image (y &lt; 0). */
    private static Volume torsoMask() {
        float[] m = new float[GRID.size()];
        for (int k = 0; k < GRID.nz(); k++) {
            for (int j = 0; j < GRID.ny(); j++) {
                for (int i = 0; i < GRID.nx(); i++) {
                    m[GRID.index(i, j, k)] = GRID.worldOf(i, j, k)[1] < 0 ? 1 : 0;
                }
            }
        }
        return new Volume(GRID, m);
    }

    /** RMS distance (mm) between two maps over the torso blob centres carried back into the fixed frame. */
    private static double rmsOverTorso(Affine3D a, Affine3D truth) {
        double ss = 0;
        Affine3D back = truth.inverse();
        for (double[] b : TORSO_BLOBS) {
            double[] y = back.applyPoint(b[0], b[1], b[2]);
            double[] p = a.applyPoint(y[0], y[1], y[2]);
            double[] q = truth.applyPoint(y[0], y[1], y[2]);
            ss += (p[0] - q[0]) * (p[0] - q[0]) + (p[1] - q[1]) * (p[1] - q[1]) + (p[2] - q[2]) * (p[2] - q[2]);
        }
        return Math.sqrt(ss / TORSO_BLOBS.length);
    }

    @Test
    void theMaskedAlignmentRecoversTheTorsoMotionAndTheWholeImageDoesNot() {
        Volume fixed = image(true);
        Volume moving = image(false);
        int[] levels = {2, 1, 0};
        double start = rmsOverTorso(Affine3D.identity(), TORSO);
        RigidAligner.Result torso = RigidAligner.align(RegistrationConfig.defaults(), new RegistrationInput(fixed,
                moving, null, torsoMask(), null, "fixed", "moving"), null, levels, Progress.NONE);
        RigidAligner.Result whole = RigidAligner.align(RegistrationConfig.defaults(), new RegistrationInput(fixed,
                moving, null, null, null, "fixed", "moving"), null, levels, Progress.NONE);
        double eTorso = rmsOverTorso(torso.fixedToMoving(), TORSO);
        double eWhole = rmsOverTorso(whole.fixedToMoving(), TORSO);
        assertTrue(start > 3, "sanity: the torso moves by more than a voxel, " + start + " mm");
        assertTrue(eTorso < MAX_RMS_MM, "torso-only alignment off by " + eTorso + " mm RMS");
        // the breast moves 7 mm differently and holds half the blobs: over the whole image it pulls the
        // alignment off the torso by a good part of that
        assertTrue(eWhole > 4 * MAX_RMS_MM, "whole-image alignment " + eWhole + " mm RMS from the torso motion");
        assertEquals(3, torso.levels().size());
        for (RigidAligner.LevelOutcome o : torso.levels()) {
            assertTrue(o.costEnd() <= o.costStart(), "a level never ends worse than it started: " + o);
            assertTrue(o.rounds() >= 1 && o.rounds() <= RigidAligner.MAX_ROUNDS, o.toString());
        }
    }

    @Test
    void aStartNearTheAnswerIsKeptAndSeveralStartsPickTheBestFinalCost() {
        Volume fixed = image(true);
        Volume moving = image(false);
        RegistrationInput in = new RegistrationInput(fixed, moving, null, torsoMask(), null, "fixed", "moving");
        RigidAligner.Result fromTruth = RigidAligner.align(RegistrationConfig.defaults(), in, TORSO, new int[] {0},
                Progress.NONE);
        assertTrue(rmsOverTorso(fromTruth.fixedToMoving(), TORSO) < MAX_RMS_MM);
        // a far start (12 mm off along z) and the true one: the result is the better of the two
        Affine3D far = Affine3D.translation(0, 0, 12).compose(TORSO);
        RigidAligner.Result both = RigidAligner.alignFromStarts(RegistrationConfig.defaults(), in, List.of(far, TORSO),
                new int[] {1, 0}, 0, 0, Progress.NONE);
        assertTrue(rmsOverTorso(both.fixedToMoving(), TORSO) < MAX_RMS_MM);
    }

    @Test
    void badSettingsAreRefusedWithTheirNames() {
        Volume img = image(false);
        RegistrationInput in = new RegistrationInput(img, img, null, null, null, "a", "b");
        RegistrationConfig c = RegistrationConfig.defaults();
        assertTrue(assertThrows(IllegalArgumentException.class, () -> RigidAligner.align(c, in, null, new int[0],
                Progress.NONE)).getMessage().contains("levels"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> RigidAligner.align(c, in, null, new int[] {9},
                Progress.NONE)).getMessage().contains("levels"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> RigidAligner.align(c, in, null, new int[] {0},
                0, 1, Progress.NONE)).getMessage().contains("stepMm"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> RigidAligner.alignFromStarts(c, in, List.of(),
                new int[] {0}, 0, 0, Progress.NONE)).getMessage().contains("start"));
    }
}
