package org.turnmark.app.phantom;

import java.util.SplittableRandom;

import org.turnmark.app.phantom.PhantomOptions.Contrast;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.registration.resample.GaussianSmoothing;

/**
 * MR-like images of the phantom in any posture.
 *
 * <p>Steps: (1) a noise-free reference image on the anatomy's fine grid (half the image spacing),
 * one intensity per tissue class ({@link #intensity}) with gland intensity varying with the local
 * gland density; (2) every voxel centre of the posture image is mapped back to the reference
 * ({@link PostureMap}) and the fine image is read trilinearly there (air: 0); (3) partial-volume
 * blurring by a Gaussian of σ = {@link #PARTIAL_VOLUME_SIGMA_VOXELS} voxel (FWHM ≈ one voxel, the
 * width of the voxel's own box average); (4) a smooth multiplicative bias field
 * {@code b(x) = exp(β B(x))}, B a sum of four random plane waves of wavelength 250–600 mm plus a
 * linear ramp, normalised to unit maximum magnitude over the grid, β = {@link #BIAS_AMPLITUDE};
 * (5) Rician noise: the magnitude {@code |S + n₁ + i n₂|} with n₁, n₂ independent N(0, σ²).
 *
 * <p>SNR definition: {@code σ = mean(S) / SNR}, where the mean runs over the breast-tissue voxels
 * (labels 1, 2, 3, 5 of the same image) of the noise-free, blurred and biased signal S. In air the
 * magnitude is Rayleigh distributed with mean σ√(π/2), which is how σ is measured back.
 *
 * <p>Deterministic for a seed: noise uses one {@link SplittableRandom} per z-slice seeded from
 * (seed, stream, k), Gaussian deviates by the Box–Muller transform with {@link StrictMath}.
 */
public final class MrRenderer {

    /** Partial-volume blur σ in voxels (FWHM = 2.355 σ ≈ 0.94 voxel). */
    public static final double PARTIAL_VOLUME_SIGMA_VOXELS = 0.4;
    /** Bias field log-amplitude: intensities vary by about ±15 % across the field of view. */
    public static final double BIAS_AMPLITUDE = 0.15;

    private MrRenderer() {
    }

    /**
     * Noise-free intensity of a tissue class (arbitrary units, 0–1000).
     *
     * @param glandDensity enveloped gland density at the point, used for the texture of gland
     */
    public static double intensity(Contrast c, int tissueClass, double glandDensity) {
        double t = Math.max(0, Math.min(1, (glandDensity - PhantomAnatomy.GLAND_THRESHOLD) / 1.5));
        if (c == Contrast.T1) {
            switch (tissueClass) {
                case PhantomAnatomy.FAT:
                    return 1000;
                case PhantomAnatomy.GLAND:
                    return 450 * (1.08 - 0.16 * t);
                case PhantomAnatomy.SKIN:
                    return 700;
                case PhantomAnatomy.MUSCLE:
                    return 330;
                case PhantomAnatomy.LESION:
                    return 420;
                case PhantomAnatomy.RIB_CAGE:
                    return 120;
                case PhantomAnatomy.BONE:
                    return 550;
                case PhantomAnatomy.LUNG:
                    return 40;
                case PhantomAnatomy.HEART:
                    return 300;
                default:
                    return 0;
            }
        }
        switch (tissueClass) {
            case PhantomAnatomy.FAT:
                return 110;
            case PhantomAnatomy.GLAND:
                return 300 * (0.92 + 0.16 * t);
            case PhantomAnatomy.SKIN:
                return 320;
            case PhantomAnatomy.MUSCLE:
                return 200;
            case PhantomAnatomy.LESION:
                return 950;
            case PhantomAnatomy.RIB_CAGE:
                return 60;
            case PhantomAnatomy.BONE:
                return 90;
            case PhantomAnatomy.LUNG:
                return 20;
            case PhantomAnatomy.HEART:
                return 180;
            default:
                return 0;
        }
    }

    /** The noise-free reference image on {@code anatomy.fineGrid()} (x fastest). */
    public static float[] referenceImage(PhantomAnatomy anatomy, Contrast c) {
        Grid3 g = anatomy.fineGrid();
        float[] out = new float[g.size()];
        int nx = g.nx();
        int ny = g.ny();
        double[] o = g.worldOf(0, 0, 0);
        double s = g.spacingMm(0);
        Parallel.forEachBlock(g.nz(), (long) g.size() * 8, k -> {
            double z = o[2] + k * s;
            for (int j = 0; j < ny; j++) {
                double y = o[1] + j * s;
                int row = nx * (j + ny * k);
                for (int i = 0; i < nx; i++) {
                    double x = o[0] + i * s;
                    int cls = anatomy.tissueClass(x, y, z, PhantomAnatomy.SKIN_MM);
                    double gd = cls == PhantomAnatomy.GLAND ? anatomy.glandDensity(x, y, z) : 0;
                    out[row + i] = (float) intensity(c, cls, gd);
                }
            }
        });
        return out;
    }

    /**
     * Labels and noise-free intensities of a posture image: each voxel centre of {@code grid} is mapped
     * back to the reference by {@code map}. Labels use a skin at least one voxel thick.
     *
     * @param labelsOut  receives labels, length grid.size()
     * @param signalOut  receives the noise-free, unblurred signal, length grid.size()
     */
    public static void sample(PhantomAnatomy anatomy, float[] fineImage, PostureMap map, Grid3 grid,
                              byte[] labelsOut, float[] signalOut) {
        Grid3 fg = anatomy.fineGrid();
        double skin = PhantomAnatomy.rasterSkinMm(grid.spacingMm(0));
        Parallel.forEachBlock(grid.nz(), (long) grid.size() * 16, k -> {
            double[] ref = new double[3];
            VoxelSampling.forEachInSlice(grid, k, (v, p) -> {
                if (map.preimage(p[0], p[1], p[2], ref)) {
                    int cls = anatomy.tissueClass(ref[0], ref[1], ref[2], skin);
                    labelsOut[v] = PhantomAnatomy.labelOf(cls);
                    signalOut[v] = cls == PhantomAnatomy.AIR ? 0f : (float) trilinear(fineImage, fg, ref);
                } else {
                    labelsOut[v] = 0;
                    signalOut[v] = 0f;
                }
            });
        });
    }

    /**
     * Blur, bias and Rician noise (steps 3–5). Returns the noisy image; {@code signal} is replaced by
     * the blurred, biased noise-free signal.
     *
     * @param labels labels of the same image (for the SNR's tissue mean)
     * @param seed   case seed
     * @param stream distinguishes the images of one case (bias and noise differ per image)
     * @return the noise σ used, and the noisy image in {@code noisyOut}
     */
    public static double finish(float[] signal, byte[] labels, Grid3 grid, double snr, long seed, int stream,
                                float[] noisyOut) {
        float[] blurred = new float[signal.length];
        double sigmaMm = PARTIAL_VOLUME_SIGMA_VOXELS * grid.spacingMm(0);
        GaussianSmoothing.smooth(signal, blurred, grid, sigmaMm, sigmaMm, sigmaMm);
        float[] bias = biasField(grid, new SplittableRandom(mix(seed, 1000 + stream)));
        double sum = 0;
        long count = 0;
        for (int v = 0; v < signal.length; v++) {
            signal[v] = blurred[v] * bias[v];
            int l = labels[v];
            if (l == 1 || l == 2 || l == 3 || l == 5) {
                sum += signal[v];
                count++;
            }
        }
        if (count == 0) {
            throw new IllegalStateException("no breast tissue in the image; cannot set the noise level");
        }
        double sigma = sum / count / snr;
        int nx = grid.nx();
        int ny = grid.ny();
        Parallel.forEachBlock(grid.nz(), (long) grid.size() * 8, k -> {
            SplittableRandom r = new SplittableRandom(mix(seed, 31L * stream + k * 7919L + 17));
            int base = nx * ny * k;
            for (int v = base; v < base + nx * ny; v++) {
                // Box–Muller: two independent N(0, 1) deviates from two uniforms.
                double u1 = 1.0 - r.nextDouble();
                double u2 = r.nextDouble();
                double rad = StrictMath.sqrt(-2 * StrictMath.log(u1));
                double n1 = sigma * rad * StrictMath.cos(2 * Math.PI * u2);
                double n2 = sigma * rad * StrictMath.sin(2 * Math.PI * u2);
                double re = signal[v] + n1;
                noisyOut[v] = (float) StrictMath.sqrt(re * re + n2 * n2);
            }
        });
        return sigma;
    }

    /** Bias field exp(β B(x)) on the grid (see class comment). */
    static float[] biasField(Grid3 grid, SplittableRandom rng) {
        int waves = 4;
        double[] f = new double[3 * waves];
        double[] phase = new double[waves];
        for (int w = 0; w < waves; w++) {
            double z = 2 * rng.nextDouble() - 1;
            double a = 2 * Math.PI * rng.nextDouble();
            double sr = Math.sqrt(1 - z * z);
            double wavelength = 250 + 350 * rng.nextDouble();
            double k = 2 * Math.PI / wavelength;
            f[3 * w] = k * sr * StrictMath.cos(a);
            f[3 * w + 1] = k * sr * StrictMath.sin(a);
            f[3 * w + 2] = k * z;
            phase[w] = 2 * Math.PI * rng.nextDouble();
        }
        double[] ramp = {2 * rng.nextDouble() - 1, 2 * rng.nextDouble() - 1, 2 * rng.nextDouble() - 1};
        double[] c = grid.worldOf((grid.nx() - 1) / 2.0, (grid.ny() - 1) / 2.0, (grid.nz() - 1) / 2.0);
        double ext = grid.nx() * grid.spacingMm(0) + grid.ny() * grid.spacingMm(1) + grid.nz() * grid.spacingMm(2);
        float[] b = new float[grid.size()];
        double[] p = new double[3];
        double maxAbs = 0;
        for (int k = 0; k < grid.nz(); k++) {
            for (int j = 0; j < grid.ny(); j++) {
                for (int i = 0; i < grid.nx(); i++) {
                    p[0] = i;
                    p[1] = j;
                    p[2] = k;
                    grid.voxelToWorld().applyPoint(p, p);
                    double dx = p[0] - c[0];
                    double dy = p[1] - c[1];
                    double dz = p[2] - c[2];
                    double sum = (ramp[0] * dx + ramp[1] * dy + ramp[2] * dz) / ext;
                    for (int w = 0; w < waves; w++) {
                        sum += 0.5 * StrictMath.cos(f[3 * w] * dx + f[3 * w + 1] * dy + f[3 * w + 2] * dz + phase[w]);
                    }
                    b[grid.index(i, j, k)] = (float) sum;
                    maxAbs = Math.max(maxAbs, Math.abs(sum));
                }
            }
        }
        double scale = maxAbs > 0 ? BIAS_AMPLITUDE / maxAbs : 0;
        for (int v = 0; v < b.length; v++) {
            b[v] = (float) StrictMath.exp(scale * b[v]);
        }
        return b;
    }

    /** Trilinear read of a fine-grid image at a world point (0 outside). */
    static double trilinear(float[] img, Grid3 g, double[] p) {
        double[] o = g.worldOf(0, 0, 0);
        double s = g.spacingMm(0);
        double fx = (p[0] - o[0]) / s;
        double fy = (p[1] - o[1]) / s;
        double fz = (p[2] - o[2]) / s;
        return VoxelSampling.trilinear(img, g.nx(), g.ny(), g.nz(), fx, fy, fz);
    }

    /** SplitMix64-style mixing of a seed and a stream number into a new seed. */
    static long mix(long seed, long stream) {
        long z = seed * 0x9E3779B97F4A7C15L + stream * 0xBF58476D1CE4E5B9L + 0x94D049BB133111EBL;
        z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
        z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
        return z ^ (z >>> 31);
    }
}
