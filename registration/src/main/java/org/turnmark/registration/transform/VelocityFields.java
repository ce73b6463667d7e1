package org.turnmark.registration.transform;

import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.registration.volume.VectorField;

/**
 * Stationary velocity fields (RAS mm per unit time on a grid) and their group exponential.
 *
 * <p>{@code exp(v)} is the time-1 flow of {@code dx/dt = v(x)}, computed by scaling and squaring
 * (Arsigny et al., MICCAI 2006): {@code u₀ = v / 2^N}, then N times {@code u ← u ∘ u} with
 * {@code (u ∘ u)(x) = u(x) + u(x + u(x))} ({@link DisplacementFields#compose}). The number of
 * squarings is chosen from the field so that the first step moves no point by more than
 * {@link #MAX_STEP_VOXELS} of the smallest voxel spacing:
 * {@code N = max(0, ⌈log₂(max|v| / (MAX_STEP_VOXELS · min spacing))⌉)}, see {@link #squaringsFor}.
 * The result is a displacement field on v's grid; the inverse map is {@code exp(−v)}.
 *
 * <p>Kernels are split into z-slices through {@link Parallel} (bit-identical for any thread count).
 */
public final class VelocityFields {

    /**
     * Largest first step of scaling and squaring, in voxels of the smallest spacing. Half a voxel keeps
     * {@code id + v/2^N} close to the flow and its Jacobian far from folding (common practice).
     */
    public static final double MAX_STEP_VOXELS = 0.5;

    /** Upper bound on the number of squarings (a field of 2^40 voxels would be absurd input). */
    public static final int MAX_SQUARINGS = 40;

    private VelocityFields() {
    }

    /**
     * The number of squarings N for v: the least N ≥ 0 with
     * {@code max|v| / 2^N ≤ MAX_STEP_VOXELS · min spacing}.
     */
    public static int squaringsFor(VectorField v) {
        double maxNorm = DisplacementFields.maxNormMm(v);
        double[] sp = v.grid().spacingMm();
        double h = Math.min(sp[0], Math.min(sp[1], sp[2]));
        double step = MAX_STEP_VOXELS * h;
        int n = 0;
        while (n < MAX_SQUARINGS && maxNorm / Math.pow(2, n) > step) {
            n++;
        }
        return n;
    }

    /** {@code exp(v)} with {@link #squaringsFor} squarings, as a new displacement field. */
    public static VectorField exp(VectorField v) {
        VectorField out = VectorField.zeros(v.grid());
        exp(v, squaringsFor(v), out, VectorField.zeros(v.grid()));
        return out;
    }

    /**
     * {@code exp(v)} by scaling and squaring with a given number of squarings.
     *
     * @param v          velocity field, not modified; must not alias {@code out} or {@code scratch}
     * @param squarings  N ≥ 0 (0 gives {@code id + v})
     * @param out        receives the displacement field of exp(v), same grid as v
     * @param scratch    workspace on the same grid, overwritten
     */
    public static void exp(VectorField v, int squarings, VectorField out, VectorField scratch) {
        if (squarings < 0 || squarings > MAX_SQUARINGS) {
            throw new IllegalArgumentException("squarings must be in [0, " + MAX_SQUARINGS + "], got " + squarings);
        }
        Grid3 g = v.grid();
        DisplacementFields.requireSameGrid(g, out.grid(), "out");
        DisplacementFields.requireSameGrid(g, scratch.grid(), "scratch");
        // Alternate between the two buffers so the last squaring lands in out.
        VectorField a = squarings % 2 == 0 ? out : scratch;
        VectorField b = squarings % 2 == 0 ? scratch : out;
        scale(v, (float) Math.scalb(1.0, -squarings), a);
        for (int s = 0; s < squarings; s++) {
            DisplacementFields.compose(a, a, b);
            VectorField t = a;
            a = b;
            b = t;
        }
    }

    /** The inverse map of exp(v): {@code exp(−v)}, as a new displacement field. */
    public static VectorField expInverse(VectorField v) {
        VectorField neg = VectorField.zeros(v.grid());
        scale(v, -1f, neg);
        return exp(neg);
    }

    /**
     * Lie bracket {@code [v, w] = (Dv) w − (Dw) v}, derivatives in world mm by central differences.
     *
     * @param out on the same grid; must alias neither v nor w
     */
    public static void lieBracket(VectorField v, VectorField w, VectorField out) {
        combine(v, w, 0, 1, out);
    }

    /**
     * Combines two velocity fields into one whose exponential approximates {@code exp(v) ∘ exp(w)}.
     * BCH: {@code v + w + ½[v, w]}; ADDITION: {@code v + w}.
     *
     * @param out same grid; may alias neither v nor w under BCH (derivatives read neighbours);
     *            under ADDITION out may alias v or w
     */
    public static void compose(VectorField v, VectorField w, UpdateRule rule, VectorField out) {
        if (rule == UpdateRule.ADDITION) {
            add(v, w, out);
        } else {
            combine(v, w, 1, 0.5, out);
        }
    }

    /** {@link #compose(VectorField, VectorField, UpdateRule, VectorField)} into a new field. */
    public static VectorField compose(VectorField v, VectorField w, UpdateRule rule) {
        VectorField out = VectorField.zeros(v.grid());
        compose(v, w, rule, out);
        return out;
    }

    /** out = a·(v + w) + b·[v, w]. */
    private static void combine(VectorField v, VectorField w, double a, double b, VectorField out) {
        Grid3 g = v.grid();
        DisplacementFields.requireSameGrid(g, w.grid(), "w");
        DisplacementFields.requireSameGrid(g, out.grid(), "out");
        if (out.x() == v.x() || out.x() == w.x()) {
            throw new IllegalArgumentException("Lie bracket: out must alias neither input");
        }
        FieldDerivatives d = new FieldDerivatives(g);
        final int nx = g.nx();
        final int ny = g.ny();
        final float[] vx = v.x();
        final float[] vy = v.y();
        final float[] vz = v.z();
        final float[] wx = w.x();
        final float[] wy = w.y();
        final float[] wz = w.z();
        final float[] ox = out.x();
        final float[] oy = out.y();
        final float[] oz = out.z();
        Parallel.forEachBlock(g.nz(), (long) g.size() * 8, k -> {
            double[] dv = new double[9];
            double[] dw = new double[9];
            for (int j = 0; j < ny; j++) {
                int n = nx * (j + ny * k);
                for (int i = 0; i < nx; i++, n++) {
                    d.jacobian(vx, vy, vz, i, j, k, dv);
                    d.jacobian(wx, wy, wz, i, j, k, dw);
                    double ax = vx[n];
                    double ay = vy[n];
                    double az = vz[n];
                    double bx = wx[n];
                    double by = wy[n];
                    double bz = wz[n];
                    // [v, w] = (Dv) w − (Dw) v
                    double cx = dv[0] * bx + dv[1] * by + dv[2] * bz - (dw[0] * ax + dw[1] * ay + dw[2] * az);
                    double cy = dv[3] * bx + dv[4] * by + dv[5] * bz - (dw[3] * ax + dw[4] * ay + dw[5] * az);
                    double cz = dv[6] * bx + dv[7] * by + dv[8] * bz - (dw[6] * ax + dw[7] * ay + dw[8] * az);
                    ox[n] = (float) (a * (ax + bx) + b * cx);
                    oy[n] = (float) (a * (ay + by) + b * cy);
                    oz[n] = (float) (a * (az + bz) + b * cz);
                }
            }
        });
    }

    /** out = s·v; out may alias v. */
    public static void scale(VectorField v, float s, VectorField out) {
        DisplacementFields.requireSameGrid(v.grid(), out.grid(), "out");
        for (int c = 0; c < 3; c++) {
            float[] src = v.component(c);
            float[] dst = out.component(c);
            Parallel.forRange(src.length, BLOCK, (from, to) -> {
                for (int n = from; n < to; n++) {
                    dst[n] = s * src[n];
                }
            });
        }
    }

    /** out = v + w; out may alias v or w. */
    public static void add(VectorField v, VectorField w, VectorField out) {
        DisplacementFields.requireSameGrid(v.grid(), w.grid(), "w");
        DisplacementFields.requireSameGrid(v.grid(), out.grid(), "out");
        for (int c = 0; c < 3; c++) {
            float[] p = v.component(c);
            float[] q = w.component(c);
            float[] dst = out.component(c);
            Parallel.forRange(p.length, BLOCK, (from, to) -> {
                for (int n = from; n < to; n++) {
                    dst[n] = p[n] + q[n];
                }
            });
        }
    }

    /** Block size for element-wise kernels (a fixed partition, independent of the thread count). */
    private static final int BLOCK = 1 << 16;
}
