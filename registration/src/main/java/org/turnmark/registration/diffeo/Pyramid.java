package org.turnmark.registration.diffeo;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.resample.GaussianSmoothing;
import org.turnmark.registration.resample.Interp;
import org.turnmark.registration.resample.Outside;
import org.turnmark.registration.resample.Resampler;
import org.turnmark.registration.volume.Volume;

/**
 * Multi-resolution levels of the fixed grid. Level l shrinks axis a by the whole factor
 * {@code f_a = max(1, round(2^l · h_min / h_a))} (so anisotropic voxels become about isotropic at
 * coarse levels), but never below {@link #MIN_LEVEL_VOXELS} voxels along an axis. A coarse voxel is
 * the centre of an f_x × f_y × f_z block of fine voxels. Images are smoothed with a Gaussian of
 * σ_a = f_a·h_a/2 mm before sampling (σ = 0 at the finest level).
 */
final class Pyramid {

    /** Fewest voxels along an axis at a coarse level. */
    static final int MIN_LEVEL_VOXELS = 8;

    private Pyramid() {
    }

    /** Shrink factors of level {@code level} along i, j, k. */
    static int[] factors(Grid3 fine, int level) {
        double[] h = fine.spacingMm();
        double hmin = Math.min(h[0], Math.min(h[1], h[2]));
        int[] n = {fine.nx(), fine.ny(), fine.nz()};
        int[] f = new int[3];
        for (int a = 0; a < 3; a++) {
            int fa = (int) Math.max(1, Math.round(Math.scalb(hmin, level) / h[a]));
            while (fa > 1 && (n[a] + fa - 1) / fa < MIN_LEVEL_VOXELS) {
                fa--;
            }
            f[a] = fa;
        }
        return f;
    }

    /** The grid of level {@code level}. */
    static Grid3 grid(Grid3 fine, int level) {
        int[] f = factors(fine, level);
        if (f[0] == 1 && f[1] == 1 && f[2] == 1) {
            return fine;
        }
        Affine3D block = new Affine3D(f[0], 0, 0, (f[0] - 1) / 2.0, 0, f[1], 0, (f[1] - 1) / 2.0,
                0, 0, f[2], (f[2] - 1) / 2.0);
        return new Grid3((fine.nx() + f[0] - 1) / f[0], (fine.ny() + f[1] - 1) / f[1], (fine.nz() + f[2] - 1) / f[2],
                fine.voxelToWorld().compose(block));
    }

    /** Smoothing σ (mm) per fine axis for level {@code level}. */
    static double[] sigmaMm(Grid3 fine, int level) {
        int[] f = factors(fine, level);
        double[] s = new double[3];
        for (int a = 0; a < 3; a++) {
            s[a] = f[a] > 1 ? 0.5 * f[a] * fine.spacingMm(a) : 0;
        }
        return s;
    }

    /** The fixed image at a level: smoothed, then sampled (trilinear, clamped) on the level grid. */
    static float[] image(Volume fine, Grid3 levelGrid, double[] sigmaMm) {
        if (levelGrid == fine.grid()) {
            return fine.data();
        }
        float[] sm = new float[fine.data().length];
        GaussianSmoothing.smooth(fine.data(), sm, fine.grid(), sigmaMm);
        return Resampler.resample(new Volume(fine.grid(), sm), levelGrid, null, null, Interp.LINEAR,
                Outside.CLAMP, 0).data();
    }

    /** A mask at a level (nearest voxel), as bytes 0/1; null stays null. */
    static byte[] mask(Volume fineMask, Grid3 levelGrid) {
        if (fineMask == null) {
            return null;
        }
        float[] m = levelGrid == fineMask.grid() ? fineMask.data()
                : Resampler.resample(fineMask, levelGrid, null, null, Interp.NEAREST, Outside.CONSTANT, 0).data();
        byte[] b = new byte[m.length];
        for (int n = 0; n < m.length; n++) {
            b[n] = (byte) (m[n] > 0.5f ? 1 : 0);
        }
        return b;
    }
}
