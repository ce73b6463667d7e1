package org.turnmark.registration.diffeo;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.geom.Progress;
import org.turnmark.registration.metric.MetricKind;
import org.turnmark.registration.metric.SimilarityMetric;
import org.turnmark.registration.resample.GaussianSmoothing;
import org.turnmark.registration.resample.Interp;
import org.turnmark.registration.resample.Interpolation;
import org.turnmark.registration.resample.Outside;
import org.turnmark.registration.resample.Resampler;
import org.turnmark.registration.transform.DisplacementFields;
import org.turnmark.registration.transform.FieldDerivatives;
import org.turnmark.registration.transform.VelocityFields;
import org.turnmark.registration.volume.VectorField;

/**
 * Log-domain diffeomorphic demons iterations at one pyramid level (Vercauteren et al., NeuroImage 45,
 * 2009, Algorithm 2), generalised to any {@link SimilarityMetric}:
 * <ol>
 * <li>map φ = A ∘ φ₀ ∘ exp(v), warped moving W = M ∘ φ on the level grid, cost and ∂cost/∂W;</li>
 * <li>force f(x): SSD uses the demons step with the symmetric (ESM) gradient
 *     f = (F − W) g / (|g|² + (F − W)²/σ_x²), g = (∇F + ∇W)/2, |f| ≤ σ_x/2 = step; other metrics use the
 *     descent direction f = −∂cost/∂W · ∇W scaled so that its largest vector is one step;</li>
 * <li>fluid-like regularisation f ← G_fluid ∗ f (widths are the configured ones times 2^level, so
 *     that regularisation in level voxels is the same at every level); trial v' = G_diffusion ∗ Z(v, s·f), Z the BCH (or
 *     additive) update rule and s ≤ 1 a step scale;</li>
 * <li>the trial becomes the new v (the velocity smoothing is not a descent step on the cost, so a
 *     demons iteration may raise it); when the cost rises, s is halved (s grows back by
 *     {@link #STEP_GROWTH} after a decrease); the level stops when s &lt; {@link #MIN_STEP_SCALE},
 *     when the best cost has not improved for the convergence window, or when the relative
 *     decrease over the window is below the tolerance;</li>
 * <li>the level returns the velocity with the lowest cost seen, so its cost never ends above its
 *     start.</li>
 * </ol>
 * <b>Symmetric variant</b> (after Vercauteren et al., MICCAI 2008, symmetric log-domain demons): the
 * moving image is first sampled through A ∘ φ₀ onto the level grid (M₀); a forward force from F
 * against M₀ ∘ exp(v) and a backward force from M₀ against F ∘ exp(−v) give the update
 * {@code v ← ½ (Z(v, δ_f) − Z(−v, δ_b))}; the monitored cost stays the forward one.
 *
 * <p>Forces are only taken at voxels inside the similarity mask whose six neighbours are inside the
 * moving image (the gradient there is not polluted by the zero fill).
 *
 * <p>Keeps grid-sized workspaces; not thread safe; kernels parallel through {@link Parallel}. With the
 * SSD metric the world-mm gradient of each reference image (F; M₀ in symmetric mode) is computed once
 * per level and kept (three {@code double} arrays on the level grid, 24 bytes per voxel per reference).
 */
final class LevelSolver {

    /** Smallest step scale tried before the level stops for lack of descent. */
    static final double MIN_STEP_SCALE = 1.0 / 32;
    /** Growth of the step scale after an accepted step (back towards 1). */
    static final double STEP_GROWTH = 1.5;
    /** Points this far (voxels) outside the moving grid's box of voxel centres still count as inside. */
    static final double INSIDE_TOLERANCE_VOXELS = 1e-6;

    private final RegistrationConfig cfg;
    private final Grid3 grid;
    private final float[] fixed;
    private final byte[] fixedMask;
    private final float[] moving;
    private final Grid3 movingGrid;
    private final float[] movingMask;
    private final VectorField initial;
    private Affine3D affine;
    private final SimilarityMetric metric;
    private final SimilarityMetric backMetric;
    private final boolean symmetric;
    private final double stepMm;
    private final double levelScale;
    private final FieldDerivatives derivatives;

    private VectorField v;
    private VectorField trial;
    private final VectorField bestV;
    private final VectorField dir;
    private final VectorField delta;
    private final VectorField s;
    private final VectorField scratch;
    private final VectorField total;
    private final float[] warped;
    private final float[] dcost;
    private final byte[] valid;
    private final byte[] mask;
    private long maskCount;
    // Symmetric mode only (null otherwise).
    private final float[] fixedMaskFloat;
    private float[] m0;
    private float[] m0Mask;
    private byte[] m0MaskBytes;
    private final VectorField sInv;
    private final VectorField negV;
    private final VectorField vb;
    private final VectorField dirB;
    private final float[] backWarped;
    private final float[] dcostB;
    private final byte[] validB;
    private final byte[] maskB;
    // SSD only: ∇F and ∇M₀ (world mm, components x, y, z) on the level grid; the references do not
    // change within a level, so their gradients are computed on first use and kept. Null until then.
    private double[][] fixedGradient;
    private double[][] m0Gradient;

    /**
     * @param fixedMask   level fixed mask (0/1) or null
     * @param moving      smoothed moving voxels on {@code movingGrid}
     * @param movingMask  moving mask voxels on {@code movingGrid} or null
     * @param initial     initial displacement on the finest fixed grid or null
     * @param affine      fixed world → moving world after φ₀, or null
     * @param stepMm      longest update vector at this level (mm)
     * @param backMetric  for the symmetric variant: the metric with the roles of the images swapped
     *                    (M₀ as reference, F ∘ exp(−v) as warped); null for forward forces only
     * @param levelScale  factor applied to the configured smoothing widths at this level (2^level)
     */
    LevelSolver(RegistrationConfig cfg, Grid3 grid, float[] fixed, byte[] fixedMask, float[] moving, Grid3 movingGrid,
                float[] movingMask, VectorField initial, Affine3D affine, SimilarityMetric metric,
                SimilarityMetric backMetric, double stepMm, double levelScale) {
        this.cfg = cfg;
        this.grid = grid;
        this.fixed = fixed;
        this.fixedMask = fixedMask;
        this.moving = moving;
        this.movingGrid = movingGrid;
        this.movingMask = movingMask;
        this.initial = initial;
        this.affine = affine;
        this.metric = metric;
        this.backMetric = backMetric;
        this.symmetric = backMetric != null;
        this.stepMm = stepMm;
        this.levelScale = levelScale;
        this.derivatives = new FieldDerivatives(grid);
        int n = grid.size();
        v = VectorField.zeros(grid);
        trial = VectorField.zeros(grid);
        bestV = VectorField.zeros(grid);
        dir = VectorField.zeros(grid);
        delta = VectorField.zeros(grid);
        s = VectorField.zeros(grid);
        scratch = VectorField.zeros(grid);
        total = initial == null ? s : VectorField.zeros(grid);
        warped = new float[n];
        dcost = new float[n];
        valid = new byte[n];
        mask = new byte[n];
        if (symmetric) {
            fixedMaskFloat = fixedMask == null ? null : new float[n];
            if (fixedMaskFloat != null) {
                for (int q = 0; q < n; q++) {
                    fixedMaskFloat[q] = fixedMask[q];
                }
            }
            sInv = VectorField.zeros(grid);
            negV = VectorField.zeros(grid);
            vb = VectorField.zeros(grid);
            dirB = VectorField.zeros(grid);
            backWarped = new float[n];
            dcostB = new float[n];
            validB = new byte[n];
            maskB = new byte[n];
        } else {
            fixedMaskFloat = null;
            sInv = null;
            negV = null;
            vb = null;
            dirB = null;
            backWarped = null;
            dcostB = null;
            validB = null;
            maskB = null;
        }
    }

    /** Replaces the affine applied after φ₀ (pre-alignment search); null for identity. */
    void setAffine(Affine3D a) {
        this.affine = a;
    }

    /** Voxels in the similarity mask after the last evaluation. */
    long maskCount() {
        return maskCount;
    }

    /** The current velocity field (the solver's own array; copy before the solver runs again). */
    VectorField velocity() {
        return v;
    }

    /**
     * Cost of the map with velocity {@code vel}; leaves W, masks and ∂cost/∂W of that map in the
     * workspaces.
     *
     * @throws IllegalArgumentException if the similarity mask is empty (no overlap)
     * @throws IllegalStateException    if the cost is not finite
     */
    double evaluate(VectorField vel) {
        int squarings = VelocityFields.squaringsFor(vel);
        VelocityFields.exp(vel, squarings, s, scratch);
        if (symmetric) {
            prepareSymmetric();
            Resampler.resampleInto(m0, grid, grid, null, s, Interp.LINEAR, Outside.CONSTANT, 0, warped);
            maskCount = computeMasks(s, null, grid, m0Mask, fixedMask, valid, mask);
        } else {
            if (initial != null) {
                DisplacementFields.compose(initial, s, total);
            }
            Resampler.resampleInto(moving, movingGrid, grid, affine, total, Interp.LINEAR, Outside.CONSTANT, 0,
                    warped);
            maskCount = computeMasks(total, affine, movingGrid, movingMask, fixedMask, valid, mask);
        }
        if (maskCount == 0) {
            throw new IllegalArgumentException("the images do not overlap inside the masks at this level: no fixed voxel "
                    + "maps inside the moving image (fixed grid " + grid + ", moving grid " + movingGrid + ")");
        }
        double c = metric.costAndDerivative(fixed, warped, mask, dcost);
        if (!Double.isFinite(c)) {
            throw new IllegalStateException("similarity cost became " + c + " (" + metric.kind() + ")");
        }
        if (symmetric) {
            // Backward half: F ∘ exp(−v) against the pre-warped moving image, in its space.
            VelocityFields.scale(vel, -1f, negV);
            VelocityFields.exp(negV, squarings, sInv, scratch);
            Resampler.resampleInto(fixed, grid, grid, null, sInv, Interp.LINEAR, Outside.CONSTANT, 0, backWarped);
            long nb = computeMasks(sInv, null, grid, fixedMaskFloat, m0MaskBytes, validB, maskB);
            if (nb > 0) {
                double cb = backMetric.costAndDerivative(m0, backWarped, maskB, dcostB);
                if (!Double.isFinite(cb)) {
                    throw new IllegalStateException("backward similarity cost became " + cb);
                }
            } else {
                java.util.Arrays.fill(dcostB, 0f);
            }
        }
        return c;
    }

    /**
     * Symmetric mode: samples the moving image once through A ∘ φ₀ onto the level grid (M₀) with its
     * mask; the symmetric iterations then register F and M₀ on one grid.
     */
    private void prepareSymmetric() {
        if (m0 != null) {
            return;
        }
        int n = grid.size();
        VectorField u0 = initial == null ? VectorField.zeros(grid) : DisplacementFields.resample(initial, grid);
        float[] w = new float[n];
        Resampler.resampleInto(moving, movingGrid, grid, affine, u0, Interp.LINEAR, Outside.CONSTANT, 0, w);
        byte[] in = new byte[n];
        byte[] mk = new byte[n];
        computeMasks(u0, affine, movingGrid, movingMask, null, in, mk);
        float[] mf = new float[n];
        for (int q = 0; q < n; q++) {
            mf[q] = mk[q];
        }
        m0MaskBytes = mk;
        m0Mask = mf;
        m0 = w;
    }

    /**
     * Marks, for each voxel x of the level grid, whether {@code toSrc(x + disp(x))} lies inside the
     * source grid ({@code validOut}) and whether it is also inside both masks ({@code maskOut}):
     * {@code ownMask} on the level grid (byte 0/1, null = all) and {@code srcMask} sampled (nearest) on
     * the source grid (float, &gt; 0.5 inside, null = all). Returns the number of mask voxels.
     */
    private long computeMasks(VectorField disp, Affine3D toSrc, Grid3 src, float[] srcMask, byte[] ownMask,
                              byte[] validOut, byte[] maskOut) {
        final int nx = grid.nx();
        final int ny = grid.ny();
        final int mx = src.nx();
        final int my = src.ny();
        final int mz = src.nz();
        Affine3D a = toSrc == null ? Affine3D.identity() : toSrc;
        final double[] toMov = src.worldToVoxel().compose(a).toRowMajor();
        final double[] vw = grid.voxelToWorld().toRowMajor();
        final float[] ux = disp.x();
        final float[] uy = disp.y();
        final float[] uz = disp.z();
        final double lo = -INSIDE_TOLERANCE_VOXELS;
        long[] counts = new long[grid.nz()];
        Parallel.forEachBlock(grid.nz(), grid.size(), k -> {
            long c = 0;
            for (int j = 0; j < ny; j++) {
                int n = nx * (j + ny * k);
                for (int i = 0; i < nx; i++, n++) {
                    double x = vw[0] * i + vw[1] * j + vw[2] * k + vw[3] + ux[n];
                    double y = vw[4] * i + vw[5] * j + vw[6] * k + vw[7] + uy[n];
                    double z = vw[8] * i + vw[9] * j + vw[10] * k + vw[11] + uz[n];
                    double ci = toMov[0] * x + toMov[1] * y + toMov[2] * z + toMov[3];
                    double cj = toMov[4] * x + toMov[5] * y + toMov[6] * z + toMov[7];
                    double ck = toMov[8] * x + toMov[9] * y + toMov[10] * z + toMov[11];
                    boolean in = ci >= lo && cj >= lo && ck >= lo && ci <= mx - 1 - lo && cj <= my - 1 - lo
                            && ck <= mz - 1 - lo;
                    validOut[n] = (byte) (in ? 1 : 0);
                    boolean m = in && (ownMask == null || ownMask[n] != 0);
                    if (m && srcMask != null) {
                        m = Interpolation.nearest(srcMask, mx, my, mz, ci, cj, ck, Outside.CLAMP, 0) > 0.5;
                    }
                    maskOut[n] = (byte) (m ? 1 : 0);
                    if (m) {
                        c++;
                    }
                }
            }
            counts[k] = c;
        });
        long total = 0;
        for (long c : counts) {
            total += c;
        }
        return total;
    }

    /**
     * Fills {@code out} with the regularised force for reference image {@code ref} against the warped
     * image {@code w} (mask, validity and ∂cost/∂W from the last evaluation); returns its largest
     * length (mm).
     */
    private double force(float[] ref, float[] w, byte[] mk, byte[] ok, float[] dc, VectorField out) {
        final int nx = grid.nx();
        final int ny = grid.ny();
        final int nz = grid.nz();
        final boolean demons = metric.kind() == MetricKind.SSD;
        final double[][] gRef = demons ? referenceGradient(ref) : null;
        final double[] gfx = demons ? gRef[0] : null;
        final double[] gfy = demons ? gRef[1] : null;
        final double[] gfz = demons ? gRef[2] : null;
        final double sigmaX2 = 4 * stepMm * stepMm;
        final float[] fx = out.x();
        final float[] fy = out.y();
        final float[] fz = out.z();
        final int slice = nx * ny;
        Parallel.forEachBlock(nz, (long) grid.size() * 4, k -> {
            double[] gw = new double[3];
            for (int j = 0; j < ny; j++) {
                int n = nx * (j + ny * k);
                for (int i = 0; i < nx; i++, n++) {
                    double ox = 0;
                    double oy = 0;
                    double oz = 0;
                    if (mk[n] != 0
                            && (i == 0 || ok[n - 1] != 0) && (i == nx - 1 || ok[n + 1] != 0)
                            && (j == 0 || ok[n - nx] != 0) && (j == ny - 1 || ok[n + nx] != 0)
                            && (k == 0 || ok[n - slice] != 0) && (k == nz - 1 || ok[n + slice] != 0)) {
                        derivatives.gradient(w, i, j, k, gw);
                        if (demons) {
                            double g0 = 0.5 * (gw[0] + gfx[n]);
                            double g1 = 0.5 * (gw[1] + gfy[n]);
                            double g2 = 0.5 * (gw[2] + gfz[n]);
                            double diff = (double) ref[n] - w[n];
                            double den = g0 * g0 + g1 * g1 + g2 * g2 + diff * diff / sigmaX2;
                            if (den > 1e-12) {
                                double c = diff / den;
                                ox = c * g0;
                                oy = c * g1;
                                oz = c * g2;
                            }
                        } else {
                            double c = -dc[n];
                            ox = c * gw[0];
                            oy = c * gw[1];
                            oz = c * gw[2];
                        }
                    }
                    fx[n] = (float) ox;
                    fy[n] = (float) oy;
                    fz[n] = (float) oz;
                }
            }
        });
        smooth(out, cfg.fluidSigmaMm() * levelScale, cfg.fluidWeight());
        double max = DisplacementFields.maxNormMm(out);
        if (!demons && max > 0) {
            VelocityFields.scale(out, (float) (stepMm / max), out);
            max = stepMm;
        }
        return max;
    }

    /**
     * The kept world-mm gradient of a reference image ({@code fixed} or {@code m0}), computed on the
     * first call; the same stencil as {@link FieldDerivatives#gradient}, so the forces are unchanged.
     */
    private double[][] referenceGradient(float[] ref) {
        if (ref == fixed) {
            if (fixedGradient == null) {
                fixedGradient = gradientOf(ref);
            }
            return fixedGradient;
        }
        if (ref == m0) {
            if (m0Gradient == null) {
                m0Gradient = gradientOf(ref);
            }
            return m0Gradient;
        }
        throw new IllegalStateException("the reference image must be the level's fixed image or M0");
    }

    /** World-mm gradient of {@code f} at every voxel of the level grid, as three component arrays. */
    private double[][] gradientOf(float[] f) {
        final int nx = grid.nx();
        final int ny = grid.ny();
        final int n = grid.size();
        final double[] gx = new double[n];
        final double[] gy = new double[n];
        final double[] gz = new double[n];
        Parallel.forEachBlock(grid.nz(), n, k -> {
            double[] g = new double[3];
            for (int j = 0; j < ny; j++) {
                int q = nx * (j + ny * k);
                for (int i = 0; i < nx; i++, q++) {
                    derivatives.gradient(f, i, j, k, g);
                    gx[q] = g[0];
                    gy[q] = g[1];
                    gz[q] = g[2];
                }
            }
        });
        return new double[][] {gx, gy, gz};
    }

    /** f ← (1 − w)·f + w·G_σ ∗ f, using {@code delta} as scratch. */
    private void smooth(VectorField f, double sigmaMm, double weight) {
        if (sigmaMm <= 0 || weight <= 0) {
            return;
        }
        if (weight >= 1) {
            GaussianSmoothing.smooth(f, f, sigmaMm);
            return;
        }
        GaussianSmoothing.smooth(f, delta, sigmaMm);
        float w = (float) weight;
        for (int c = 0; c < 3; c++) {
            float[] a = f.component(c);
            float[] b = delta.component(c);
            Parallel.forRange(a.length, 1 << 16, (from, to) -> {
                for (int n = from; n < to; n++) {
                    a[n] = (1 - w) * a[n] + w * b[n];
                }
            });
        }
    }

    /**
     * Optimises the velocity field at this level and leaves the best field seen (lowest cost) as
     * {@link #velocity()}.
     *
     * @param start    starting velocity on this level's grid (copied)
     * @param maxIter  iteration budget
     * @param level    level index for the report (0 = finest)
     */
    LevelReport run(VectorField start, int maxIter, int level, Progress progress) {
        long t0 = System.nanoTime();
        copy(start, v);
        double cost = evaluate(v);
        double before = cost;
        double best = cost;
        copy(v, bestV);
        int sinceBest = 0;
        double[] history = new double[maxIter + 1];
        history[0] = cost;
        int iterations = 0;
        int raised = 0;
        double scale = 1;
        StopReason reason = StopReason.ITERATIONS;
        while (iterations < maxIter) {
            progress.checkCancelled();
            double maxForce = force(fixed, warped, mask, valid, dcost, dir);
            if (symmetric) {
                maxForce = Math.max(maxForce, force(m0, backWarped, maskB, validB, dcostB, dirB));
            }
            if (!(maxForce > 0)) {
                reason = StopReason.NO_DESCENT;
                break;
            }
            VelocityFields.scale(dir, (float) scale, delta);
            VelocityFields.compose(v, delta, cfg.updateRule(), trial);
            if (symmetric) {
                // v ← ½ (Z(v, δ_f) − Z(−v, δ_b)) (symmetric log-domain update).
                VelocityFields.scale(dirB, (float) scale, delta);
                VelocityFields.scale(v, -1f, negV);
                VelocityFields.compose(negV, delta, cfg.updateRule(), vb);
                VelocityFields.scale(vb, -1f, vb);
                VelocityFields.add(trial, vb, trial);
                VelocityFields.scale(trial, 0.5f, trial);
            }
            smooth(trial, cfg.diffusionSigmaMm() * levelScale, cfg.diffusionWeight());
            double c = evaluate(trial);
            VectorField t = v;
            v = trial;
            trial = t;
            iterations++;
            history[iterations] = c;
            if (c > cost) {
                // The step overshot (or the velocity smoothing outweighed it): shorter steps from now on.
                raised++;
                scale *= 0.5;
            } else {
                scale = Math.min(1, scale * STEP_GROWTH);
            }
            cost = c;
            if (c < best) {
                best = c;
                copy(v, bestV);
                sinceBest = 0;
            } else {
                sinceBest++;
            }
            progress.update("level " + level, (double) iterations / maxIter);
            int w = cfg.convergenceWindow();
            if (scale < MIN_STEP_SCALE) {
                reason = StopReason.NO_DESCENT;
                break;
            }
            if (sinceBest >= w) {
                reason = StopReason.CONVERGED;
                break;
            }
            if (iterations >= w) {
                double old = history[iterations - w];
                double rel = (old - best) / Math.max(Math.abs(best), 1e-300);
                if (rel < cfg.convergenceTolerance()) {
                    reason = StopReason.CONVERGED;
                    break;
                }
            }
        }
        copy(bestV, v);
        double seconds = (System.nanoTime() - t0) * 1e-9;
        return new LevelReport(level, grid.nx(), grid.ny(), grid.nz(), grid.spacingMm(), before, best, iterations,
                raised, reason, seconds);
    }

    private static void copy(VectorField from, VectorField to) {
        for (int c = 0; c < 3; c++) {
            System.arraycopy(from.component(c), 0, to.component(c), 0, from.component(c).length);
        }
    }
}
