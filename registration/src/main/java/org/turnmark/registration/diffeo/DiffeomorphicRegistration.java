package org.turnmark.registration.diffeo;

import java.util.ArrayList;
import java.util.List;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.geom.Progress;
import org.turnmark.registration.metric.IntensityRange;
import org.turnmark.registration.metric.LocalCorrelation;
import org.turnmark.registration.metric.MattesMutualInformation;
import org.turnmark.registration.metric.SimilarityMetric;
import org.turnmark.registration.metric.SumOfSquaredDifferences;
import org.turnmark.registration.resample.GaussianSmoothing;
import org.turnmark.registration.transform.DisplacementFields;
import org.turnmark.registration.transform.JacobianStats;
import org.turnmark.registration.transform.Jacobians;
import org.turnmark.registration.transform.VelocityFields;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Multi-resolution log-domain diffeomorphic registration (stationary velocity field, demons-style
 * optimisation after Vercauteren et al., NeuroImage 45, 2009; exponential by scaling and squaring,
 * Arsigny et al., MICCAI 2006).
 *
 * <p><b>Map convention.</b> The result maps fixed-image points to moving-image points:
 * {@code φ(x) = A(φ₀(exp(v)(x)))}, i.e. x + u(x) with u on the fixed grid in RAS mm. φ₀ is the
 * optional initial displacement ("residual mode": the registration refines it, and because the
 * residual exp(v) is a diffeomorphism the result is exactly as invertible as φ₀ is); A is the
 * optional pre-alignment affine. The warped moving image is M ∘ φ.
 *
 * <p><b>Levels.</b> The fixed grid is shrunk by about 2^l per level ({@link Pyramid}); both images are
 * smoothed for the level; the velocity field of a coarser level is sampled onto the next grid (vectors
 * are in mm, so unchanged) and the finer level keeps composing its updates onto it with the same
 * update rule (BCH or addition). A level's cost never rises within the level (steps are accepted only
 * if they lower it). At the end the finest-level cost of the result is compared with that of the
 * starting map; if it is not lower, the result says so ({@link RegistrationResult#improved()} false)
 * and returns the starting map (v = 0) rather than a worse one.
 *
 * <p><b>Symmetric variant</b> ({@link RegistrationConfig#symmetric()}): at each level the moving
 * image is sampled once through A ∘ φ₀ onto the level grid (M₀) and the velocity is updated with
 * forward and backward forces, v ← ½ (Z(v, δ_f) − Z(−v, δ_b)) (Vercauteren et al., MICCAI 2008),
 * so that swapping the images gives (approximately) the inverse residual. The map convention is
 * unchanged.
 *
 * <p><b>Bad input.</b> Non-finite voxels, empty masks, constant images and an initial field on another
 * grid are rejected by {@link RegistrationInput} and here with {@link IllegalArgumentException}s naming
 * the image; images that do not overlap under the starting map raise one as well.
 *
 * <p>Deterministic: all kernels use fixed partitions through {@link Parallel}, so the result is
 * bit-identical for any thread count. Instances are immutable and may be shared; each call allocates
 * its own workspaces (about 130 bytes per fixed voxel at the finest level plus the images).
 */
public final class DiffeomorphicRegistration {

    /** Pyramid level (at least) on which the pre-alignment runs: about 4× the finest spacing. */
    public static final int PRE_ALIGNMENT_LEVEL = 2;

    private final RegistrationConfig config;

    public DiffeomorphicRegistration(RegistrationConfig config) {
        if (config == null) {
            throw new IllegalArgumentException("config must be given");
        }
        this.config = config;
    }

    public RegistrationConfig config() {
        return config;
    }

    /**
     * Registers the moving image to the fixed one.
     *
     * @param progress receives per-level progress; cancellation ends the run with
     *                 {@link Progress.CancelledException}
     * @throws IllegalArgumentException for bad input (constant images, no overlap, …)
     */
    public RegistrationResult register(RegistrationInput in, Progress progress) {
        long t0 = System.nanoTime();
        Progress p = progress == null ? Progress.NONE : progress;
        Grid3 fine = in.fixed().grid();
        byte[] fineMask = Pyramid.mask(in.fixedMask(), fine);
        byte[] movingMaskBytes = Pyramid.mask(in.movingMask(), in.moving().grid());
        // Constant images have no contrast to register: reject before any work.
        IntensityRange.of(in.fixed().data(), fineMask, in.fixedName());
        IntensityRange.of(in.moving().data(), movingMaskBytes, in.movingName());
        float[] movingMaskData = in.movingMask() == null ? null : in.movingMask().data();

        int levels = config.levels();
        int[] its = config.iterations();
        List<LevelReport> reports = new ArrayList<>();
        VectorField v = null;
        Affine3D affine = null;
        double costInitial = Double.NaN;
        double costFinal = Double.NaN;
        if (config.preAlignment() != PreAlignment.NONE) {
            // Global alignment on a coarse grid (about 4× the finest spacing) whatever the pyramid depth.
            int level = Math.max(levels - 1, PRE_ALIGNMENT_LEVEL);
            Grid3 g = Pyramid.grid(fine, level);
            float[] f = Pyramid.image(in.fixed(), g, Pyramid.sigmaMm(fine, level));
            byte[] m = Pyramid.mask(in.fixedMask(), g);
            float[] mov = movingAtLevel(in.moving(), fine, level);
            double levelScale = Math.pow(2, level);
            LevelSolver solver = new LevelSolver(config, g, f, m, mov, in.moving().grid(), movingMaskData,
                    in.initial(), null, metricFor(g, f, m, mov, movingMaskBytes, in, false), null,
                    config.maxStepMm() * levelScale, levelScale);
            checkOverlap(solver, g, in);
            p.update("pre-alignment", 0);
            affine = PreAligner.align(solver, g, centreOfMass(f, m, g),
                    in.initial() == null ? shift(f, m, g, in.moving(), movingMaskBytes) : new double[3],
                    config.preAlignment());
        }
        for (int li = 0; li < levels; li++) {
            int level = levels - 1 - li;
            Grid3 g = Pyramid.grid(fine, level);
            double[] sigmaFixed = Pyramid.sigmaMm(fine, level);
            float[] f = Pyramid.image(in.fixed(), g, sigmaFixed);
            byte[] m = Pyramid.mask(in.fixedMask(), g);
            float[] mov = movingAtLevel(in.moving(), fine, level);
            SimilarityMetric metric = metricFor(g, f, m, mov, movingMaskBytes, in, false);
            SimilarityMetric back = config.symmetric() ? metricFor(g, f, m, mov, movingMaskBytes, in, true) : null;
            double levelScale = Math.pow(2, level);
            LevelSolver solver = new LevelSolver(config, g, f, m, mov, in.moving().grid(), movingMaskData,
                    in.initial(), affine, metric, back, config.maxStepMm() * levelScale, levelScale);
            Progress lp = p.sub("registration level " + (li + 1) + "/" + levels, (double) li / levels,
                    (double) (li + 1) / levels);
            if (li == 0) {
                checkOverlap(solver, g, in);
            }
            VectorField start = v == null ? VectorField.zeros(g) : DisplacementFields.resample(v, g);
            if (level == 0) {
                costInitial = solver.evaluate(VectorField.zeros(g));
            }
            LevelReport r = solver.run(start, its[li], level, lp);
            reports.add(r);
            v = solver.velocity().copy();
            costFinal = r.costAfter();
        }
        boolean improved = costFinal < costInitial;
        if (!improved) {
            v = VectorField.zeros(fine);
            costFinal = costInitial;
        }
        VectorField residual = VelocityFields.exp(v);
        VectorField total = in.initial() == null ? residual.copy() : DisplacementFields.compose(in.initial(), residual);
        if (affine != null) {
            applyAffine(affine, total);
        }
        Volume fineMaskVolume = in.fixedMask();
        JacobianStats jac = Jacobians.summarize(Jacobians.determinant(total), fineMaskVolume);
        JacobianStats jacResidual = Jacobians.summarize(Jacobians.determinant(residual), fineMaskVolume);
        p.update("registration", 1);
        double seconds = (System.nanoTime() - t0) * 1e-9;
        return new RegistrationResult(v, total, affine == null ? Affine3D.identity() : affine, config.metric(),
                costInitial, costFinal, improved, reports, jac, jacResidual, seconds);
    }

    float[] movingAtLevel(Volume moving, Grid3 fine, int level) {
        if (level == 0) {
            return moving.data();
        }
        double h = Math.min(fine.spacingMm(0), Math.min(fine.spacingMm(1), fine.spacingMm(2)));
        float[] out = new float[moving.data().length];
        GaussianSmoothing.smooth(moving.data(), out, moving.grid(), 0.5 * h * Math.pow(2, level));
        return out;
    }

    /** The level's metric; {@code swapped} gives the backward one (moving image as reference). */
    SimilarityMetric metricFor(Grid3 g, float[] f, byte[] m, float[] mov, byte[] movMask, RegistrationInput in,
                                       boolean swapped) {
        IntensityRange rf = config.metric() == org.turnmark.registration.metric.MetricKind.SSD ? null
                : IntensityRange.of(f, m, in.fixedName());
        IntensityRange rm = config.metric() == org.turnmark.registration.metric.MetricKind.SSD ? null
                : IntensityRange.of(mov, movMask, in.movingName());
        switch (config.metric()) {
            case SSD:
                return new SumOfSquaredDifferences();
            case LNCC:
                return new LocalCorrelation(g, config.lnccRadiusMm(), config.lnccWindow(), swapped ? rm : rf,
                        swapped ? rf : rm);
            case MI:
                return new MattesMutualInformation(config.miBins(), swapped ? rm : rf, swapped ? rf : rm);
            default:
                throw new IllegalStateException("unknown metric " + config.metric());
        }
    }

    static void checkOverlap(LevelSolver solver, Grid3 g, RegistrationInput in) {
        try {
            solver.evaluate(VectorField.zeros(g));
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException(in.fixedName() + " and " + in.movingName()
                    + " do not overlap inside their masks under the starting map (fixed world box "
                    + box(in.fixed().grid()) + ", moving world box " + box(in.moving().grid()) + ")", e);
        }
    }

    private static String box(Grid3 g) {
        double[] lo = {Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY};
        double[] hi = {Double.NEGATIVE_INFINITY, Double.NEGATIVE_INFINITY, Double.NEGATIVE_INFINITY};
        for (int c = 0; c < 8; c++) {
            double[] w = g.worldOf((c & 1) * (g.nx() - 1), ((c >> 1) & 1) * (g.ny() - 1), ((c >> 2) & 1) * (g.nz() - 1));
            for (int a = 0; a < 3; a++) {
                lo[a] = Math.min(lo[a], w[a]);
                hi[a] = Math.max(hi[a], w[a]);
            }
        }
        return String.format(java.util.Locale.ROOT, "[%.1f..%.1f, %.1f..%.1f, %.1f..%.1f] mm",
                lo[0], hi[0], lo[1], hi[1], lo[2], hi[2]);
    }

    /** Intensity-weighted centre (RAS mm) of (data − min) inside the mask. */
    static double[] centreOfMass(float[] data, byte[] mask, Grid3 g) {
        double lo = Double.POSITIVE_INFINITY;
        for (int n = 0; n < data.length; n++) {
            if (mask == null || mask[n] != 0) {
                lo = Math.min(lo, data[n]);
            }
        }
        double sw = 0;
        double si = 0;
        double sj = 0;
        double sk = 0;
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    int n = g.index(i, j, k);
                    if (mask == null || mask[n] != 0) {
                        double w = data[n] - lo;
                        sw += w;
                        si += w * i;
                        sj += w * j;
                        sk += w * k;
                    }
                }
            }
        }
        if (!(sw > 0)) {
            return g.worldOf((g.nx() - 1) / 2.0, (g.ny() - 1) / 2.0, (g.nz() - 1) / 2.0);
        }
        return g.worldOf(si / sw, sj / sw, sk / sw);
    }

    private static double[] shift(float[] f, byte[] m, Grid3 g, Volume moving, byte[] movMask) {
        double[] cf = centreOfMass(f, m, g);
        double[] cm = centreOfMass(moving.data(), movMask, moving.grid());
        return new double[] {cm[0] - cf[0], cm[1] - cf[1], cm[2] - cf[2]};
    }

    /** u ← A(x + u) − x in place. */
    private static void applyAffine(Affine3D a, VectorField u) {
        Grid3 g = u.grid();
        double[] m = a.toRowMajor();
        double[] vw = g.voxelToWorld().toRowMajor();
        final int nx = g.nx();
        final int ny = g.ny();
        final float[] ux = u.x();
        final float[] uy = u.y();
        final float[] uz = u.z();
        Parallel.forEachBlock(g.nz(), g.size(), k -> {
            for (int j = 0; j < ny; j++) {
                int n = nx * (j + ny * k);
                for (int i = 0; i < nx; i++, n++) {
                    double x = vw[0] * i + vw[1] * j + vw[2] * k + vw[3];
                    double y = vw[4] * i + vw[5] * j + vw[6] * k + vw[7];
                    double z = vw[8] * i + vw[9] * j + vw[10] * k + vw[11];
                    double px = x + ux[n];
                    double py = y + uy[n];
                    double pz = z + uz[n];
                    ux[n] = (float) (m[0] * px + m[1] * py + m[2] * pz + m[3] - x);
                    uy[n] = (float) (m[4] * px + m[5] * py + m[6] * pz + m[7] - y);
                    uz[n] = (float) (m[8] * px + m[9] * py + m[10] * pz + m[11] - z);
                }
            }
        });
    }
}
