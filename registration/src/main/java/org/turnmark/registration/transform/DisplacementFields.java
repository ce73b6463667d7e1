package org.turnmark.registration.transform;

import java.util.Locale;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.registration.resample.Interp;
import org.turnmark.registration.resample.Outside;
import org.turnmark.registration.resample.Resampler;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Operations on dense displacement fields. A displacement field {@code u} on a grid represents the
 * map {@code φ(x) = x + u(x)} for world points x (RAS+ mm) at the grid's voxel centres; components
 * are RAS mm. Between voxel centres u is trilinear; outside the grid it is extended by its edge
 * values (clamp), see {@link FieldSampling}.
 *
 * <p>All kernels are split into z-slices through {@link Parallel}, so results are bit-identical for
 * any thread count. Stateless; safe for concurrent use on distinct outputs.
 */
public final class DisplacementFields {

    private DisplacementFields() {
    }

    /**
     * Composition {@code (id + outer) ∘ (id + inner)}: {@code out(x) = inner(x) + outer(x + inner(x))}
     * for the voxel centres x of {@code inner}'s grid. {@code outer} may live on another grid; it is
     * sampled through world coordinates (trilinear, clamped at its border).
     *
     * @param outer applied second; not modified; must not alias {@code out}
     * @param inner applied first; not modified unless it is {@code out}
     * @param out   receives the composite on {@code inner}'s grid; may alias {@code inner}
     */
    public static void compose(VectorField outer, VectorField inner, VectorField out) {
        Grid3 g = inner.grid();
        requireSameGrid(g, out.grid(), "out");
        if (out.x() == outer.x() || out.y() == outer.y() || out.z() == outer.z()) {
            throw new IllegalArgumentException("compose: out must not alias outer");
        }
        Grid3 go = outer.grid();
        // x(ijk) = A ijk + t on inner's grid; outer voxel coordinate = W (x + u) + s.
        Affine3D toOuterVoxel = go.worldToVoxel().compose(g.voxelToWorld());
        double[] m = toOuterVoxel.toRowMajor();
        double[] w = go.worldToVoxel().toRowMajor();
        final int nx = g.nx();
        final int ny = g.ny();
        final int nz = g.nz();
        final int ox = go.nx();
        final int oy = go.ny();
        final int oz = go.nz();
        final float[] ix = inner.x();
        final float[] iy = inner.y();
        final float[] iz = inner.z();
        final float[] px = outer.x();
        final float[] py = outer.y();
        final float[] pz = outer.z();
        final float[] rx = out.x();
        final float[] ry = out.y();
        final float[] rz = out.z();
        Parallel.forEachBlock(nz, (long) g.size() * 4, k -> {
            double[] s = new double[3];
            for (int j = 0; j < ny; j++) {
                int n = nx * (j + ny * k);
                double bi = m[1] * j + m[2] * k + m[3];
                double bj = m[5] * j + m[6] * k + m[7];
                double bk = m[9] * j + m[10] * k + m[11];
                for (int i = 0; i < nx; i++, n++) {
                    double ux = ix[n];
                    double uy = iy[n];
                    double uz = iz[n];
                    double ci = bi + m[0] * i + w[0] * ux + w[1] * uy + w[2] * uz;
                    double cj = bj + m[4] * i + w[4] * ux + w[5] * uy + w[6] * uz;
                    double ck = bk + m[8] * i + w[8] * ux + w[9] * uy + w[10] * uz;
                    FieldSampling.sample(px, py, pz, ox, oy, oz, ci, cj, ck, s);
                    rx[n] = (float) (ux + s[0]);
                    ry[n] = (float) (uy + s[1]);
                    rz[n] = (float) (uz + s[2]);
                }
            }
        });
    }

    /** {@link #compose(VectorField, VectorField, VectorField)} into a new field on inner's grid. */
    public static VectorField compose(VectorField outer, VectorField inner) {
        VectorField out = VectorField.zeros(inner.grid());
        compose(outer, inner, out);
        return out;
    }

    /**
     * Maps one world point: {@code out = p + u(p)} with u trilinear, clamped at the grid border.
     *
     * @param pointRasMm p (length ≥ 3), not modified unless it aliases {@code out}
     * @param out        receives φ(p) in RAS mm; may alias {@code pointRasMm}
     */
    public static void applyToPoint(VectorField u, double[] pointRasMm, double[] out) {
        Grid3 g = u.grid();
        double[] c = new double[3];
        g.worldToVoxel().applyPoint(pointRasMm, c);
        double[] s = new double[3];
        FieldSampling.sample(u.x(), u.y(), u.z(), g.nx(), g.ny(), g.nz(), c[0], c[1], c[2], s);
        out[0] = pointRasMm[0] + s[0];
        out[1] = pointRasMm[1] + s[1];
        out[2] = pointRasMm[2] + s[2];
    }

    /**
     * Applies the map to an image: {@code W(x) = M(x + u(x))} on u's grid, trilinear through world
     * coordinates; points outside the moving grid get 0.
     *
     * @param moving the image to warp, on any grid; not modified
     * @return a new volume on u's grid
     */
    public static Volume warp(Volume moving, VectorField u) {
        return Resampler.resample(moving, u.grid(), null, u, Interp.LINEAR, Outside.CONSTANT, 0);
    }

    /**
     * Samples {@code u} at the voxel centres of {@code target} (trilinear through world coordinates,
     * clamped at u's border). The vectors are world mm, so they are copied, not rescaled.
     *
     * @return a new field on {@code target}
     */
    public static VectorField resample(VectorField u, Grid3 target) {
        VectorField zero = VectorField.zeros(target);
        // out(x) = 0 + u(x + 0): composition with the zero field samples u at the target's centres.
        VectorField out = VectorField.zeros(target);
        compose(u, zero, out);
        return out;
    }

    /**
     * The displacement field of an affine world map on {@code grid}: {@code u(x) = A x − x}.
     *
     * @param worldMap maps fixed-grid world points (RAS mm) to their images (RAS mm)
     */
    public static VectorField fromAffine(Affine3D worldMap, Grid3 grid) {
        VectorField u = VectorField.zeros(grid);
        final int nx = grid.nx();
        final int ny = grid.ny();
        Affine3D m = worldMap.compose(grid.voxelToWorld());
        double[] a = m.toRowMajor();
        double[] v = grid.voxelToWorld().toRowMajor();
        final float[] ux = u.x();
        final float[] uy = u.y();
        final float[] uz = u.z();
        Parallel.forEachBlock(grid.nz(), grid.size(), k -> {
            for (int j = 0; j < ny; j++) {
                int n = nx * (j + ny * k);
                for (int i = 0; i < nx; i++, n++) {
                    ux[n] = (float) ((a[0] - v[0]) * i + (a[1] - v[1]) * j + (a[2] - v[2]) * k + a[3] - v[3]);
                    uy[n] = (float) ((a[4] - v[4]) * i + (a[5] - v[5]) * j + (a[6] - v[6]) * k + a[7] - v[7]);
                    uz[n] = (float) ((a[8] - v[8]) * i + (a[9] - v[9]) * j + (a[10] - v[10]) * k + a[11] - v[11]);
                }
            }
        });
        return u;
    }

    /** Largest vector length |u(x)| over the grid, in mm. */
    public static double maxNormMm(VectorField u) {
        final float[] x = u.x();
        final float[] y = u.y();
        final float[] z = u.z();
        Grid3 g = u.grid();
        final int slice = g.nx() * g.ny();
        double[] perSlice = new double[g.nz()];
        Parallel.forEachBlock(g.nz(), g.size(), k -> {
            double m = 0;
            for (int n = k * slice, end = n + slice; n < end; n++) {
                double s = (double) x[n] * x[n] + (double) y[n] * y[n] + (double) z[n] * z[n];
                if (s > m) {
                    m = s;
                }
            }
            perSlice[k] = m;
        });
        double m = 0;
        for (double s : perSlice) {
            m = Math.max(m, s);
        }
        return Math.sqrt(m);
    }

    /**
     * Rejects a field with a non-finite component.
     *
     * @param what names the field in the message, e.g. the file name
     * @throws IllegalArgumentException naming the first offending voxel and component
     */
    public static void requireFinite(VectorField u, String what) {
        Grid3 g = u.grid();
        for (int c = 0; c < 3; c++) {
            float[] a = u.component(c);
            for (int n = 0; n < a.length; n++) {
                if (!Float.isFinite(a[n])) {
                    int i = n % g.nx();
                    int j = (n / g.nx()) % g.ny();
                    int k = n / (g.nx() * g.ny());
                    throw new IllegalArgumentException(String.format(Locale.ROOT,
                            "%s: component %c at voxel (%d, %d, %d) must be finite, got %s",
                            what, "xyz".charAt(c), i, j, k, a[n]));
                }
            }
        }
    }

    static void requireSameGrid(Grid3 expected, Grid3 actual, String what) {
        if (expected != actual && !expected.sameGrid(actual, GRID_TOLERANCE_MM)) {
            throw new IllegalArgumentException(what + " must be on grid " + expected + ", got " + actual);
        }
    }

    /** Affine entries (mm) within which two grids count as the same (float header precision). */
    public static final double GRID_TOLERANCE_MM = 1e-4;
}
