package org.turnmark.registration.metric;

import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.registration.resample.GaussianSmoothing;

/**
 * Local normalised cross-correlation (Avants et al., Med Image Anal 12, 2008): for each mask voxel y
 * with window sums over mask voxels (weights w, box or Gaussian)
 * <pre>
 *   A = Σ w F W − S_F S_W / S_1,  B = Σ w F² − S_F² / S_1,  C = Σ w W² − S_W² / S_1,
 *   cc(y) = A² / (B C)  ∈ [0, 1],       cost = −(1/N) Σ_y cc(y)
 * </pre>
 * N counts the mask voxels whose window holds at least {@link #MIN_WINDOW_FRACTION} of its full
 * weight inside the mask (it depends on the mask only, not on W);
 * cc = 0 where the window is flat in either image, B or C ≤ {@link #FLAT_VARIANCE}·S_1). The
 * derivative is exact for the symmetric box window (y ∈ win(x) ⇔ x ∈ win(y)):
 * <pre>
 *   ∂cost/∂W(x) = −(1/N) [F(x)·Σ α − Σ α F̄ − W(x)·Σ β + Σ β W̄],  α = 2A/(BC), β = 2A²/(BC²)
 * </pre>
 * with the sums over windows containing x, computed as four more window sums. Intensities are first
 * mapped to [0, 1] by the fixed ranges given at construction (cc is invariant to that; the float
 * window sums keep their precision). Window sums: running sums for {@link LnccWindow#BOX},
 * {@link GaussianSmoothing} for {@link LnccWindow#GAUSSIAN} (reflecting border, so the derivative
 * is approximate within 4σ of the grid border).
 *
 * <p>Keeps ten grid-sized float workspaces; not thread safe; kernels parallel, bit-identical.
 */
public final class LocalCorrelation implements SimilarityMetric {

    /** Window variance (in normalised intensity², range = 1) below which a window counts as flat. */
    public static final double FLAT_VARIANCE = 1e-6;
    /**
     * Smallest window half-width in voxels per axis: a 3-voxel window has too few samples for a
     * stable correlation (common practice), which matters at coarse pyramid levels.
     */
    public static final int MIN_RADIUS_VOXELS = 2;
    /** Windows with less than this fraction of their full weight inside the mask are skipped. */
    public static final double MIN_WINDOW_FRACTION = 0.25;

    private final Grid3 grid;
    private final LnccWindow window;
    private final int rx;
    private final int ry;
    private final int rz;
    private final double sigmaMm;
    private final double fullWeight;
    private final double f0;
    private final double fs;
    private final double w0;
    private final double ws;
    private final float[] s1;
    private final float[] sf;
    private final float[] sw;
    private final float[] sff;
    private final float[] sww;
    private final float[] sfw;
    private final float[] fn;
    private final float[] wn;

    /**
     * @param grid         the grid all arrays live on
     * @param radiusMm     window half-width in mm (&gt; 0); per axis rounded to whole voxels, at least {@link #MIN_RADIUS_VOXELS}
     * @param window       box or Gaussian weights
     * @param fixedRange   intensity range of the fixed image
     * @param movingRange  intensity range of the moving image
     */
    public LocalCorrelation(Grid3 grid, double radiusMm, LnccWindow window, IntensityRange fixedRange,
                            IntensityRange movingRange) {
        if (!(radiusMm > 0) || !Double.isFinite(radiusMm)) {
            throw new IllegalArgumentException("LNCC window radius must be > 0 mm, got " + radiusMm);
        }
        this.grid = grid;
        this.window = window;
        this.rx = Math.max(MIN_RADIUS_VOXELS, (int) Math.round(radiusMm / grid.spacingMm(0)));
        this.ry = Math.max(MIN_RADIUS_VOXELS, (int) Math.round(radiusMm / grid.spacingMm(1)));
        this.rz = Math.max(MIN_RADIUS_VOXELS, (int) Math.round(radiusMm / grid.spacingMm(2)));
        this.sigmaMm = radiusMm / 2;
        this.fullWeight = window == LnccWindow.BOX ? (2.0 * rx + 1) * (2.0 * ry + 1) * (2.0 * rz + 1) : 1.0;
        this.f0 = fixedRange.min();
        this.fs = 1.0 / fixedRange.width();
        this.w0 = movingRange.min();
        this.ws = 1.0 / movingRange.width();
        int n = grid.size();
        s1 = new float[n];
        sf = new float[n];
        sw = new float[n];
        sff = new float[n];
        sww = new float[n];
        sfw = new float[n];
        fn = new float[n];
        wn = new float[n];
    }

    @Override
    public MetricKind kind() {
        return MetricKind.LNCC;
    }

    /** Window half-widths in voxels along i, j, k. */
    public int[] radiusVoxels() {
        return new int[] {rx, ry, rz};
    }

    @Override
    public double cost(float[] fixed, float[] warped, byte[] mask) {
        return run(fixed, warped, mask, null);
    }

    @Override
    public double costAndDerivative(float[] fixed, float[] warped, byte[] mask, float[] derivative) {
        if (derivative.length != fixed.length || derivative == fixed || derivative == warped) {
            throw new IllegalArgumentException("derivative must be a separate array of " + fixed.length + " values");
        }
        return run(fixed, warped, mask, derivative);
    }

    private void windowSum(float[] a) {
        if (window == LnccWindow.BOX) {
            BoxSums.boxSum(a, grid.nx(), grid.ny(), grid.nz(), rx, ry, rz);
        } else {
            GaussianSmoothing.smooth(a, a, grid, sigmaMm);
        }
    }

    private double run(float[] f, float[] w, byte[] mask, float[] d) {
        final int n = grid.size();
        MetricChecks.lengths(n, f, w, mask);
        MetricChecks.count(mask);
        final int nb = Parallel.blockCount(n, MetricChecks.BLOCK);
        // Normalised, masked images and the products whose window sums are needed.
        Parallel.forEachBlock(nb, n, b -> {
            for (int i = b * MetricChecks.BLOCK, end = Math.min(n, i + MetricChecks.BLOCK); i < end; i++) {
                float a = (float) ((f[i] - f0) * fs);
                float c = (float) ((w[i] - w0) * ws);
                fn[i] = a;
                wn[i] = c;
                if (mask[i] != 0) {
                    s1[i] = 1f;
                    sf[i] = a;
                    sw[i] = c;
                    sff[i] = a * a;
                    sww[i] = c * c;
                    sfw[i] = a * c;
                } else {
                    s1[i] = 0f;
                    sf[i] = 0f;
                    sw[i] = 0f;
                    sff[i] = 0f;
                    sww[i] = 0f;
                    sfw[i] = 0f;
                }
            }
        });
        windowSum(s1);
        windowSum(sf);
        windowSum(sw);
        windowSum(sff);
        windowSum(sww);
        windowSum(sfw);
        final double minWeight = MIN_WINDOW_FRACTION * fullWeight;
        double[] partial = new double[nb];
        long[] used = new long[nb];
        // Per voxel: cc, then the coefficient maps α, β, αF̄, βW̄ written over sff, sww, sfw, sf.
        Parallel.forEachBlock(nb, n, b -> {
            double acc = 0;
            long u = 0;
            for (int i = b * MetricChecks.BLOCK, end = Math.min(n, i + MetricChecks.BLOCK); i < end; i++) {
                double alpha = 0;
                double beta = 0;
                double fbar = 0;
                double wbar = 0;
                double m = s1[i];
                if (mask[i] != 0 && m >= minWeight) {
                    u++;
                    fbar = sf[i] / m;
                    wbar = sw[i] / m;
                    double a = sfw[i] - sf[i] * wbar;
                    double bb = sff[i] - sf[i] * fbar;
                    double cc = sww[i] - sw[i] * wbar;
                    double flat = FLAT_VARIANCE * m;
                    if (bb > flat && cc > flat) {
                        double bc = bb * cc;
                        acc += a * a / bc;
                        alpha = 2 * a / bc;
                        beta = alpha * a / cc;
                    }
                }
                sff[i] = (float) alpha;
                sww[i] = (float) beta;
                sfw[i] = (float) (alpha * fbar);
                sf[i] = (float) (beta * wbar);
            }
            partial[b] = acc;
            used[b] = u;
        });
        double sum = 0;
        long count = 0;
        for (int b = 0; b < nb; b++) {
            sum += partial[b];
            count += used[b];
        }
        if (count == 0) {
            throw new IllegalArgumentException("no mask voxel has a correlation window at least "
                    + MIN_WINDOW_FRACTION + " inside the mask (window " + rx + "x" + ry + "x" + rz
                    + " voxels half-width); the mask is too thin or the window too large");
        }
        double costValue = -sum / count;
        if (d == null) {
            return costValue;
        }
        windowSum(sff);
        windowSum(sww);
        windowSum(sfw);
        windowSum(sf);
        // Chain rule through the normalisation W' = (W − w0)·ws.
        final double scale = -ws / count;
        Parallel.forEachBlock(nb, n, b -> {
            for (int i = b * MetricChecks.BLOCK, end = Math.min(n, i + MetricChecks.BLOCK); i < end; i++) {
                if (mask[i] != 0) {
                    double g = fn[i] * (double) sff[i] - sfw[i] - wn[i] * (double) sww[i] + sf[i];
                    d[i] = (float) (scale * g);
                } else {
                    d[i] = 0f;
                }
            }
        });
        return costValue;
    }
}
