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
 * Forces are only taken at voxels inside the similarity mask whose six neighbours are inside the
 * moving image (the gradient there is not polluted by the zero fill).
 *
 * <p>Keeps grid-sized workspaces; not thread safe; kernels parallel through {@link Parallel}.
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

    /**
     * @param fixedMask   level fixed mask (0/1) or null
     * @param moving      smoothed moving voxels on {@code movingGrid}
     * @param movingMask  moving mask voxels on {@code movingGrid} or null
     * @param initial     initial displacement on the finest fixed grid or null
     * @param affine      fixed world → moving world after φ₀, or null
     * @param stepMm      longest update vector at this level (mm)
     * @param levelScale  factor applied to the configured smoothing widths at this level (2^level)
     */
    LevelSolver(RegistrationConfig cfg, Grid3 grid, float[] fixed, byte[] fixedMask, float[] moving, Grid3 movingGrid,
                float[] movingMask, VectorField initial, Affine3D affine, SimilarityMetric metric, double stepMm,
                double levelScale) {
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
        if (initial != null) {
            DisplacementFields.compose(initial, s, total);
        }
        Resampler.resampleInto(moving, movingGrid, grid, affine, total, Interp.LINEAR, Outside.CONSTANT, 0, warped);
        maskCount = computeMasks();
        if (maskCount == 0) {
            throw new IllegalArgumentException("the images do not overlap inside the masks at this level: no fixed voxel "
                    + "maps inside the moving image (fixed grid " + grid + ", moving grid " + movingGrid + ")");
        }
        double c = metric.costAndDerivative(fixed, warped, mask, dcost);
        if (!Double.isFinite(c)) {
            throw new IllegalStateException("similarity cost became " + c + " (" + metric.kind() + ")");
        }
        return c;
    }

    private long computeMasks() {
        final int nx = grid.nx();
        final int ny = grid.ny();
        final int mx = movingGrid.nx();
        final int my = movingGrid.ny();
        final int mz = movingGrid.nz();
        Affine3D a = affine == null ? Affine3D.identity() : affine;
        final double[] toMov = movingGrid.worldToVoxel().compose(a).toRowMajor();
        final double[] vw = grid.voxelToWorld().toRowMajor();
        final float[] ux = total.x();
        final float[] uy = total.y();
        final float[] uz = total.z();
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
                    valid[n] = (byte) (in ? 1 : 0);
                    boolean m = in && (fixedMask == null || fixedMask[n] != 0);
                    if (m && movingMask != null) {
                        m = Interpolation.nearest(movingMask, mx, my, mz, ci, cj, ck, Outside.CLAMP, 0) > 0.5;
                    }
                    mask[n] = (byte) (m ? 1 : 0);
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

    /** Fills {@code dir} with the regularised force of the current state; returns its largest length (mm). */
    private double force() {
        final int nx = grid.nx();
        final int ny = grid.ny();
        final int nz = grid.nz();
        final boolean demons = metric.kind() == MetricKind.SSD;
        final double sigmaX2 = 4 * stepMm * stepMm;
        final float[] fx = dir.x();
        final float[] fy = dir.y();
        final float[] fz = dir.z();
        final int slice = nx * ny;
        Parallel.forEachBlock(nz, (long) grid.size() * 4, k -> {
            double[] gw = new double[3];
            double[] gf = new double[3];
            for (int j = 0; j < ny; j++) {
                int n = nx * (j + ny * k);
                for (int i = 0; i < nx; i++, n++) {
                    double ox = 0;
                    double oy = 0;
                    double oz = 0;
                    if (mask[n] != 0
                            && (i == 0 || valid[n - 1] != 0) && (i == nx - 1 || valid[n + 1] != 0)
                            && (j == 0 || valid[n - nx] != 0) && (j == ny - 1 || valid[n + nx] != 0)
                            && (k == 0 || valid[n - slice] != 0) && (k == nz - 1 || valid[n + slice] != 0)) {
                        derivatives.gradient(warped, i, j, k, gw);
                        if (demons) {
                            derivatives.gradient(fixed, i, j, k, gf);
                            double g0 = 0.5 * (gw[0] + gf[0]);
                            double g1 = 0.5 * (gw[1] + gf[1]);
                            double g2 = 0.5 * (gw[2] + gf[2]);
                            double diff = (double) fixed[n] - warped[n];
                            double den = g0 * g0 + g1 * g1 + g2 * g2 + diff * diff / sigmaX2;
                            if (den > 1e-12) {
                                double c = diff / den;
                                ox = c * g0;
                                oy = c * g1;
                                oz = c * g2;
                            }
                        } else {
                            double c = -dcost[n];
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
        smooth(dir, cfg.fluidSigmaMm() * levelScale, cfg.fluidWeight());
        double max = DisplacementFields.maxNormMm(dir);
        if (!demons && max > 0) {
            VelocityFields.scale(dir, (float) (stepMm / max), dir);
            max = stepMm;
        }
        return max;
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
            double maxForce = force();
            if (!(maxForce > 0)) {
                reason = StopReason.NO_DESCENT;
                break;
            }
            VelocityFields.scale(dir, (float) scale, delta);
            VelocityFields.compose(v, delta, cfg.updateRule(), trial);
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
