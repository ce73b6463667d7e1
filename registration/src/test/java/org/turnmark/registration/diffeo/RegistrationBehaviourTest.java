package org.turnmark.registration.diffeo;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.concurrent.ForkJoinPool;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.registration.metric.MetricKind;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/** Determinism, honest failure, pre-alignment and bad input. */
class RegistrationBehaviourTest {

    private static final SyntheticPair PAIR = new SyntheticPair(11, 2.5);
    private static final Grid3 GRID = SyntheticPair.centred(28, 28, 24, 2.5);

    private static RegistrationConfig quick(MetricKind m) {
        return RegistrationConfig.defaults().withMetric(m).withIterations(6, 6).withMaxStepMm(0.5);
    }

    @Test
    void resultIsBitIdenticalForOneAndThreeThreads() throws Exception {
        Volume f = PAIR.fixed(GRID);
        Volume m = PAIR.moving(GRID, false);
        VectorField[] out = new VectorField[2];
        int[] threads = {1, 3};
        for (int t = 0; t < 2; t++) {
            int slot = t;
            ForkJoinPool pool = new ForkJoinPool(threads[t]);
            try {
                pool.submit(() -> {
                    out[slot] = new DiffeomorphicRegistration(quick(MetricKind.LNCC))
                            .register(RegistrationInput.of(f, m), Progress.NONE).displacement();
                }).get();
            } finally {
                pool.shutdown();
            }
        }
        assertArrayEquals(out[0].x(), out[1].x());
        assertArrayEquals(out[0].y(), out[1].y());
        assertArrayEquals(out[0].z(), out[1].z());
        assertTrue(Math.abs(out[0].x()[GRID.index(14, 14, 12)]) + Math.abs(out[0].y()[GRID.index(14, 14, 12)]) > 0,
                "the registration must have moved something (non-trivial case)");
    }

    @Test
    void identicalImagesCannotBeImprovedAndSaySo() {
        // SSD of an image with itself is 0, the global minimum: no field can lower it.
        Volume f = PAIR.fixed(GRID);
        RegistrationResult r = new DiffeomorphicRegistration(quick(MetricKind.SSD))
                .register(RegistrationInput.of(f, f.copy()), Progress.NONE);
        assertFalse(r.improved());
        assertEquals(r.costInitial(), r.costFinal(), 0.0);
        for (float v : r.displacement().x()) {
            assertEquals(0f, v, 0f);
        }
    }

    @Test
    void rigidPreAlignmentFindsTableShift() {
        // The moving scan is the fixed one moved by (6, −4, 3) mm (closed form: y = x + t).
        double[] t = {6, -4, 3};
        Volume f = PAIR.fixed(GRID);
        float[] d = new float[GRID.size()];
        for (int k = 0; k < GRID.nz(); k++) {
            for (int j = 0; j < GRID.ny(); j++) {
                for (int i = 0; i < GRID.nx(); i++) {
                    double[] p = GRID.worldOf(i, j, k);
                    d[GRID.index(i, j, k)] = (float) PAIR.texture(p[0] - t[0], p[1] - t[1], p[2] - t[2]);
                }
            }
        }
        Volume m = new Volume(GRID, d);
        RegistrationResult r = new DiffeomorphicRegistration(quick(MetricKind.LNCC).withIterations(0, 0)
                .withPreAlignment(PreAlignment.RIGID)).register(RegistrationInput.of(f, m), Progress.NONE);
        double[] centre = GRID.worldOf(13.5, 13.5, 11.5);
        double[] mapped = r.preAlignment().applyPoint(centre[0], centre[1], centre[2]);
        for (int a = 0; a < 3; a++) {
            // A quarter of the 2.5 mm voxel: the similarity optimum of a smooth image pins a shift to
            // well below a voxel (common practice).
            assertEquals(centre[a] + t[a], mapped[a], 0.6, "axis " + a);
        }
    }

    @Test
    void nonOverlappingImagesAreRejected() {
        Volume f = PAIR.fixed(GRID);
        Grid3 far = Grid3.axisAligned(28, 28, 24, 2.5, 2.5, 2.5, 500, 0, 0);
        Volume m = new Volume(far, PAIR.fixed(GRID).data());
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new DiffeomorphicRegistration(quick(MetricKind.SSD)).register(
                        new RegistrationInput(f, m, null, null, null, "supine.nii.gz", "prone.nii.gz"), Progress.NONE));
        assertTrue(e.getMessage().contains("do not overlap") && e.getMessage().contains("prone.nii.gz"), e.getMessage());
    }

    @Test
    void constantImageIsRejected() {
        Volume f = PAIR.fixed(GRID);
        Volume c = Volume.zeros(GRID);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new DiffeomorphicRegistration(quick(MetricKind.LNCC)).register(
                        new RegistrationInput(f, c, null, null, null, "fixed.nii.gz", "flat.nii.gz"), Progress.NONE));
        assertTrue(e.getMessage().contains("flat.nii.gz") && e.getMessage().contains("constant"), e.getMessage());
    }

    @Test
    void nonFiniteVoxelIsRejectedWithItsIndex() {
        Volume f = PAIR.fixed(GRID);
        Volume m = f.copy();
        m.data()[GRID.index(3, 4, 5)] = Float.POSITIVE_INFINITY;
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new RegistrationInput(f, m, null, null, null, "f", "moving.nii.gz"));
        assertTrue(e.getMessage().contains("moving.nii.gz") && e.getMessage().contains("(3, 4, 5)"), e.getMessage());
    }

    @Test
    void emptyMaskIsRejected() {
        Volume f = PAIR.fixed(GRID);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new RegistrationInput(f, f, Volume.zeros(GRID), null, null, "f", "m"));
        assertTrue(e.getMessage().contains("fixed mask is empty"), e.getMessage());
    }

    @Test
    void initialFieldOnAnotherGridIsRejected() {
        Volume f = PAIR.fixed(GRID);
        VectorField other = VectorField.zeros(new Grid3(28, 28, 24, Affine3D.scaling(2, 2, 2)));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new RegistrationInput(f, f, null, null, other, "f", "m"));
        assertTrue(e.getMessage().contains("initial displacement field must be on the fixed grid"), e.getMessage());
    }

    @Test
    void configRejectsBadValuesNamingTheField() {
        RegistrationConfig d = RegistrationConfig.defaults();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> d.withSmoothing(-1, 1));
        assertTrue(e.getMessage().contains("fluidSigmaMm") && e.getMessage().contains("-1"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> d.withIterations(10, -2));
        assertTrue(e.getMessage().contains("iterations"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> d.withWeights(1.5, 1));
        assertTrue(e.getMessage().contains("fluidWeight"), e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> d.withMaxStepMm(Double.NaN));
        assertEquals(3, d.levels());
    }
}
