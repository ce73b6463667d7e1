package org.turnmark.registration.transform;

import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Jacobian determinant of the map {@code x ↦ x + u(x)}: {@code det(I + ∂u/∂x)} with derivatives in
 * world mm through the voxel→world matrix (central differences, one-sided at the border; REFERENCE
 * §5). det J &gt; 1 expansion, &lt; 1 compression, ≤ 0 folding. Central differences can miss folds one
 * voxel wide. Kernels split into z-slices through {@link Parallel}; bit-identical for any thread
 * count.
 */
public final class Jacobians {

    private Jacobians() {
    }

    /** det J at every voxel of u's grid, as a new volume (dimensionless). */
    public static Volume determinant(VectorField u) {
        Grid3 g = u.grid();
        float[] out = new float[g.size()];
        FieldDerivatives d = new FieldDerivatives(g);
        final int nx = g.nx();
        final int ny = g.ny();
        final float[] ux = u.x();
        final float[] uy = u.y();
        final float[] uz = u.z();
        Parallel.forEachBlock(g.nz(), (long) g.size() * 4, k -> {
            double[] m = new double[9];
            for (int j = 0; j < ny; j++) {
                int n = nx * (j + ny * k);
                for (int i = 0; i < nx; i++, n++) {
                    d.jacobian(ux, uy, uz, i, j, k, m);
                    double a = 1 + m[0];
                    double e = 1 + m[4];
                    double q = 1 + m[8];
                    out[n] = (float) (a * (e * q - m[5] * m[7]) - m[1] * (m[3] * q - m[5] * m[6])
                            + m[2] * (m[3] * m[7] - e * m[6]));
                }
            }
        });
        return new Volume(g, out);
    }

    /**
     * Summary of a determinant map inside a mask.
     *
     * @param detJ from {@link #determinant}
     * @param mask same grid, voxels &gt; 0.5 are inside; null for all voxels
     * @throws IllegalArgumentException if the mask is on another grid or empty
     */
    public static JacobianStats summarize(Volume detJ, Volume mask) {
        Grid3 g = detJ.grid();
        if (mask != null) {
            DisplacementFields.requireSameGrid(g, mask.grid(), "Jacobian summary mask");
        }
        final float[] dj = detJ.data();
        final float[] mk = mask == null ? null : mask.data();
        final int slice = g.nx() * g.ny();
        final int nz = g.nz();
        // Per-slice partial sums, reduced in slice order (deterministic).
        long[] count = new long[nz];
        long[] nonPos = new long[nz];
        double[] min = new double[nz];
        double[] max = new double[nz];
        double[] sum = new double[nz];
        long[] nLog = new long[nz];
        Parallel.forEachBlock(nz, g.size(), k -> {
            long c = 0;
            long np = 0;
            long nl = 0;
            double lo = Double.POSITIVE_INFINITY;
            double hi = Double.NEGATIVE_INFINITY;
            double s = 0;
            for (int n = k * slice, end = n + slice; n < end; n++) {
                if (mk != null && !(mk[n] > 0.5f)) {
                    continue;
                }
                double v = dj[n];
                c++;
                lo = Math.min(lo, v);
                hi = Math.max(hi, v);
                if (v <= 0) {
                    np++;
                } else {
                    s += Math.log(v);
                    nl++;
                }
            }
            count[k] = c;
            nonPos[k] = np;
            min[k] = lo;
            max[k] = hi;
            sum[k] = s;
            nLog[k] = nl;
        });
        long c = 0;
        long np = 0;
        long nl = 0;
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        double s = 0;
        for (int k = 0; k < nz; k++) {
            c += count[k];
            np += nonPos[k];
            nl += nLog[k];
            lo = Math.min(lo, min[k]);
            hi = Math.max(hi, max[k]);
            s += sum[k];
        }
        if (c == 0) {
            throw new IllegalArgumentException("Jacobian summary mask selects no voxel (expected ≥ 1 voxel > 0.5)");
        }
        double mean = nl > 0 ? s / nl : 0;
        double[] ss = new double[nz];
        Parallel.forEachBlock(nz, g.size(), k -> {
            double acc = 0;
            for (int n = k * slice, end = n + slice; n < end; n++) {
                if ((mk == null || mk[n] > 0.5f) && dj[n] > 0) {
                    double dl = Math.log(dj[n]) - mean;
                    acc += dl * dl;
                }
            }
            ss[k] = acc;
        });
        double var = 0;
        for (int k = 0; k < nz; k++) {
            var += ss[k];
        }
        double sd = nl > 0 ? Math.sqrt(var / nl) : 0;
        return new JacobianStats(c, lo, hi, 100.0 * np / c, mean, sd);
    }
}
