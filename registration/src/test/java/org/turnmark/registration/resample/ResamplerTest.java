package org.turnmark.registration.resample;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

class ResamplerTest {

    /**
     * Identity resampling: target voxel maps to moving voxel through V2W then W2V; the round trip
     * of a float-valued position is exact to ~1e-13 voxel, so linear weights off an integer are
     * ~1e-13 and the float result equals the sample to within one float ulp of values of order 1.
     */
    private static final double IDENTITY_TOLERANCE = 1e-6;

    private static Volume randomVolume(Grid3 g, long seed) {
        Random r = new Random(seed);
        float[] a = new float[g.size()];
        for (int i = 0; i < a.length; i++) {
            a[i] = (float) (2 * r.nextDouble() - 1);
        }
        return new Volume(g, a);
    }

    private static Grid3 obliqueGrid(int nx, int ny, int nz) {
        Affine3D rot = Affine3D.rotation(0.3, -0.5, 0.8, 0.4);
        return new Grid3(nx, ny, nz, Affine3D.translation(-10, 5, 3).compose(rot).compose(Affine3D.scaling(0.9, 1.1, 1.7)));
    }

    @Test
    void identityResamplingReproducesTheImageForEveryKind() {
        Grid3 g = obliqueGrid(9, 7, 5);
        Volume v = randomVolume(g, 1);
        for (Interp kind : Interp.values()) {
            Volume r = Resampler.resample(v, g, null, null, kind, Outside.FAIL);
            for (int q = 0; q < g.size(); q++) {
                assertEquals(v.data()[q], r.data()[q], IDENTITY_TOLERANCE, kind.name());
            }
        }
    }

    @Test
    void parallelResampleEqualsSequentialNaiveLoopBitForBit() {
        Grid3 mg = obliqueGrid(31, 27, 23);
        Volume v = randomVolume(mg, 2);
        Grid3 tg = Grid3.axisAligned(40, 33, 29, 0.8, 0.8, 0.9, -14, -8, -6);
        Affine3D a = Affine3D.rotation(0, 0, 1, 0.1).compose(Affine3D.translation(1.5, -0.5, 0.25));
        VectorField u = VectorField.zeros(tg);
        Random r = new Random(3);
        for (int q = 0; q < tg.size(); q++) {
            u.x()[q] = (float) r.nextGaussian();
            u.y()[q] = (float) r.nextGaussian();
            u.z()[q] = (float) r.nextGaussian();
        }
        for (Interp kind : Interp.values()) {
            float[] src = Interpolation.prepare(kind, v.data(), mg.nx(), mg.ny(), mg.nz());
            Volume par = Resampler.resample(v, tg, a, u, kind, Outside.CONSTANT, -2.0);
            // Sequential reference with the same per-voxel arithmetic.
            double[] m = mg.worldToVoxel().compose(a).toRowMajor();
            double[] t = tg.voxelToWorld().toRowMajor();
            float[] seq = new float[tg.size()];
            for (int k = 0; k < tg.nz(); k++) {
                for (int j = 0; j < tg.ny(); j++) {
                    for (int i = 0; i < tg.nx(); i++) {
                        int n = tg.index(i, j, k);
                        double wx = t[1] * j + t[2] * k + t[3] + t[0] * i + u.x()[n];
                        double wy = t[5] * j + t[6] * k + t[7] + t[4] * i + u.y()[n];
                        double wz = t[9] * j + t[10] * k + t[11] + t[8] * i + u.z()[n];
                        double x = m[0] * wx + m[1] * wy + m[2] * wz + m[3];
                        double y = m[4] * wx + m[5] * wy + m[6] * wz + m[7];
                        double z = m[8] * wx + m[9] * wy + m[10] * wz + m[11];
                        seq[n] = (float) Interpolation.sample(kind, src, mg.nx(), mg.ny(), mg.nz(), x, y, z,
                                Outside.CONSTANT, -2.0);
                    }
                }
            }
            assertArrayEquals(seq, par.data(), kind.name());
            int filled = 0;
            for (float f : par.data()) {
                if (f == -2.0f) {
                    filled++;
                }
            }
            assertTrue(filled > 0 && filled < tg.size(), "case must have inside and outside samples");
        }
    }

    @Test
    void translationByWholeVoxelsShiftsSamples() {
        Grid3 g = Grid3.axisAligned(8, 6, 5, 2, 2, 2, 0, 0, 0);
        Volume v = randomVolume(g, 4);
        // target world x -> moving world x + 4 mm = two voxels along i
        Volume r = Resampler.resample(v, g, Affine3D.translation(4, 0, 0), null, Interp.LINEAR, Outside.CONSTANT);
        for (int k = 0; k < 5; k++) {
            for (int j = 0; j < 6; j++) {
                for (int i = 0; i < 8; i++) {
                    double expected = i + 2 < 8 ? v.get(i + 2, j, k) : 0.0;
                    assertEquals(expected, r.get(i, j, k), IDENTITY_TOLERANCE);
                }
            }
        }
    }

    @Test
    void displacementFieldOnAnotherGridIsRejected() {
        Grid3 g = Grid3.axisAligned(4, 4, 4, 1, 1, 1, 0, 0, 0);
        Grid3 h = Grid3.axisAligned(4, 4, 4, 1, 1, 1, 0.5, 0, 0);
        Volume v = randomVolume(g, 5);
        assertThrows(IllegalArgumentException.class,
                () -> Resampler.resample(v, g, null, VectorField.zeros(h), Interp.LINEAR, Outside.CLAMP));
        assertThrows(IllegalArgumentException.class,
                () -> Resampler.resample(v, g, null, null, Interp.LINEAR, Outside.CONSTANT, Double.NaN));
    }

    @Test
    void displacementIsAppliedBeforeTheAffine() {
        // x -> A (x + t) for a constant field t must equal the single affine A ∘ T(t) (closed form);
        // the other order, T(t) ∘ A, differs because A rotates.
        Grid3 mg = obliqueGrid(21, 19, 17);
        Volume v = randomVolume(mg, 8);
        Grid3 tg = Grid3.axisAligned(23, 21, 19, 0.9, 0.9, 0.9, -12, -6, -4);
        Affine3D a = Affine3D.rotation(0, 0, 1, 0.35);
        double[] t = {1.7, -0.6, 0.9};
        VectorField u = VectorField.zeros(tg);
        java.util.Arrays.fill(u.x(), (float) t[0]);
        java.util.Arrays.fill(u.y(), (float) t[1]);
        java.util.Arrays.fill(u.z(), (float) t[2]);
        Affine3D ut = Affine3D.translation(u.x()[0], u.y()[0], u.z()[0]);
        Volume withField = Resampler.resample(v, tg, a, u, Interp.LINEAR, Outside.CONSTANT);
        Volume composed = Resampler.resample(v, tg, a.compose(ut), null, Interp.LINEAR, Outside.CONSTANT);
        Volume wrongOrder = Resampler.resample(v, tg, ut.compose(a), null, Interp.LINEAR, Outside.CONSTANT);
        double maxWrong = 0;
        for (int q = 0; q < tg.size(); q++) {
            assertEquals(composed.data()[q], withField.data()[q], IDENTITY_TOLERANCE);
            maxWrong = Math.max(maxWrong, Math.abs(wrongOrder.data()[q] - withField.data()[q]));
        }
        assertTrue(maxWrong > 0.1, "the order of displacement and affine must matter in this case");
    }
}
