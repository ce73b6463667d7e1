package org.turnmark.app.phantom;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;

/**
 * The true map of one posture: reference (gravity-free) anatomy → posture image.
 *
 * <p>Definition (the truth of the case, used for its images and every truth file alike):
 * <ul>
 *   <li>tissue (labels 1, 2, 3, 5 at X): {@code Φ(X) = T(X + ũ(X))}, where ũ is the finite-element
 *       displacement sampled at the image-grid voxel centres inside the mesh, extended outside it by
 *       repeated averaging of known neighbours, and read trilinearly (so the truth is the
 *       finite-element solution interpolated at the image spacing);</li>
 *   <li>chest wall (label 4) and air: {@code Φ(X) = T(X)}, rigid;</li>
 *   <li>{@code T}: the rigid placement of the torso in the posture image (identity for prone; the
 *       torso rotation and table shift for supine).</li>
 * </ul>
 * The inverse ({@link #preimage}) solves {@code X + ũ(X) = T⁻¹x} by fixed-point steps then Newton's
 * method on the trilinear field (accepted below {@link #INVERSE_TOLERANCE_MM}) and takes a tissue
 * preimage first; otherwise the rigid preimage if it is chest wall; otherwise air. Immutable, thread
 * safe.
 */
public final class TruthPosture implements PostureMap {

    /** Residual |X + ũ(X) − x| (mm) accepted by the inverse: far below any voxel. */
    public static final double INVERSE_TOLERANCE_MM = 1e-4;

    private static final int MAX_NEWTON = 40;

    /** Per-thread scratch for u and ∇u, keeping the per-voxel calls allocation-free. */
    private static final ThreadLocal<double[]> SCRATCH = ThreadLocal.withInitial(() -> new double[3]);
    private static final ThreadLocal<double[]> JACOBIAN = ThreadLocal.withInitial(() -> new double[9]);

    private final PhantomAnatomy anatomy;
    private final Grid3 grid;
    private final float[] ux;
    private final float[] uy;
    private final float[] uz;
    private final Affine3D placement;
    private final Affine3D placementInverse;
    private final double ox;
    private final double oy;
    private final double oz;
    private final double s;

    /**
     * @param anatomy   reference anatomy
     * @param grid      axis-aligned grid of the displacement samples
     * @param ux        x displacement (mm) at every voxel centre (already extended outside the mesh)
     * @param uy        y displacement (mm)
     * @param uz        z displacement (mm)
     * @param placement rigid torso placement T (chest-wall frame → image frame)
     */
    public TruthPosture(PhantomAnatomy anatomy, Grid3 grid, float[] ux, float[] uy, float[] uz, Affine3D placement) {
        this.anatomy = anatomy;
        this.grid = grid;
        this.ux = ux;
        this.uy = uy;
        this.uz = uz;
        this.placement = placement;
        this.placementInverse = placement.inverse();
        double[] o = grid.worldOf(0, 0, 0);
        this.ox = o[0];
        this.oy = o[1];
        this.oz = o[2];
        this.s = grid.spacingMm(0);
    }

    /** The rigid torso placement T (chest-wall frame → image frame). */
    public Affine3D placement() {
        return placement;
    }

    /** Sampled displacement components (mm), the arrays themselves: do not modify. */
    public float[][] displacementSamples() {
        return new float[][] {ux, uy, uz};
    }

    /** True if tissue class c moves with the tissue (fat, gland, skin, lesion). */
    static boolean isTissue(int c) {
        return c == PhantomAnatomy.FAT || c == PhantomAnatomy.GLAND || c == PhantomAnatomy.SKIN
                || c == PhantomAnatomy.LESION;
    }

    /**
     * Image of a reference point treated as tissue: {@code T(X + ũ(X))}, written into out (may alias X).
     */
    public void forwardTissue(double[] X, double[] out) {
        double[] w = SCRATCH.get();
        sample(X[0], X[1], X[2], w, null);
        out[0] = X[0] + w[0];
        out[1] = X[1] + w[1];
        out[2] = X[2] + w[2];
        placement.applyPoint(out, out);
    }

    /** Image of a reference point by its own class (tissue moves, chest wall and air are rigid). */
    public void forward(double[] X, double[] out) {
        int c = anatomy.tissueClass(X[0], X[1], X[2], PhantomAnatomy.SKIN_MM);
        if (isTissue(c)) {
            forwardTissue(X, out);
        } else {
            placement.applyPoint(X, out);
        }
    }

    @Override
    public boolean preimage(double x, double y, double z, double[] out) {
        double[] p = {x, y, z};
        placementInverse.applyPoint(p, p);
        double skin = PhantomAnatomy.rasterSkinMm(s);
        if (invertTissue(p[0], p[1], p[2], out)
                && isTissue(anatomy.tissueClass(out[0], out[1], out[2], skin))) {
            return true;
        }
        int c = anatomy.tissueClass(p[0], p[1], p[2], skin);
        if (PhantomAnatomy.isChestWall(c)) {
            out[0] = p[0];
            out[1] = p[1];
            out[2] = p[2];
            return true;
        }
        return false;
    }

    /**
     * Solves X + ũ(X) = (px, py, pz) (chest-wall frame). Returns false if it does not converge.
     *
     * @param out receives X
     */
    public boolean invertTissue(double px, double py, double pz, double[] out) {
        double[] u = SCRATCH.get();
        double[] J = JACOBIAN.get();
        double X = px;
        double Y = py;
        double Z = pz;
        // Fixed-point steps X ← x − ũ(X) bring the start close (contractive where |∇ũ| < 1).
        for (int it = 0; it < 6; it++) {
            sample(X, Y, Z, u, null);
            X = px - u[0];
            Y = py - u[1];
            Z = pz - u[2];
        }
        for (int it = 0; it < MAX_NEWTON; it++) {
            sample(X, Y, Z, u, J);
            double fx = X + u[0] - px;
            double fy = Y + u[1] - py;
            double fz = Z + u[2] - pz;
            double r = Math.sqrt(fx * fx + fy * fy + fz * fz);
            if (r < INVERSE_TOLERANCE_MM) {
                out[0] = X;
                out[1] = Y;
                out[2] = Z;
                return true;
            }
            // A = I + ∇ũ; solve A d = f by Cramer's rule.
            double a00 = 1 + J[0];
            double a01 = J[1];
            double a02 = J[2];
            double a10 = J[3];
            double a11 = 1 + J[4];
            double a12 = J[5];
            double a20 = J[6];
            double a21 = J[7];
            double a22 = 1 + J[8];
            double det = a00 * (a11 * a22 - a12 * a21) - a01 * (a10 * a22 - a12 * a20) + a02 * (a10 * a21 - a11 * a20);
            if (!(det > 1e-6)) {
                return false;
            }
            double dx = (fx * (a11 * a22 - a12 * a21) - a01 * (fy * a22 - a12 * fz) + a02 * (fy * a21 - a11 * fz)) / det;
            double dy = (a00 * (fy * a22 - a12 * fz) - fx * (a10 * a22 - a12 * a20) + a02 * (a10 * fz - fy * a20)) / det;
            double dz = (a00 * (a11 * fz - fy * a21) - a01 * (a10 * fz - fy * a20) + fx * (a10 * a21 - a11 * a20)) / det;
            double step = Math.sqrt(dx * dx + dy * dy + dz * dz);
            // Limit a step to one voxel: the trilinear Jacobian is only valid within its cell.
            double lim = step > s ? s / step : 1;
            X -= lim * dx;
            Y -= lim * dy;
            Z -= lim * dz;
        }
        return false;
    }

    /**
     * Trilinear ũ at a point (coordinates clamped to the grid: constant extension beyond it), and
     * optionally its gradient J[3r + c] = ∂ũ_r/∂x_c (mm/mm).
     */
    void sample(double x, double y, double z, double[] u, double[] J) {
        int nx = grid.nx();
        int ny = grid.ny();
        int nz = grid.nz();
        double fx = clamp((x - ox) / s, nx - 1);
        double fy = clamp((y - oy) / s, ny - 1);
        double fz = clamp((z - oz) / s, nz - 1);
        int i = Math.min((int) fx, Math.max(nx - 2, 0));
        int j = Math.min((int) fy, Math.max(ny - 2, 0));
        int k = Math.min((int) fz, Math.max(nz - 2, 0));
        double tx = fx - i;
        double ty = fy - j;
        double tz = fz - k;
        int p = i + nx * (j + ny * k);
        int sy = nx;
        int sz = nx * ny;
        for (int c = 0; c < 3; c++) {
            float[] a = c == 0 ? ux : (c == 1 ? uy : uz);
            double v000 = a[p];
            double v100 = a[p + 1];
            double v010 = a[p + sy];
            double v110 = a[p + sy + 1];
            double v001 = a[p + sz];
            double v101 = a[p + sz + 1];
            double v011 = a[p + sy + sz];
            double v111 = a[p + sy + sz + 1];
            double c00 = v000 + tx * (v100 - v000);
            double c10 = v010 + tx * (v110 - v010);
            double c01 = v001 + tx * (v101 - v001);
            double c11 = v011 + tx * (v111 - v011);
            double c0 = c00 + ty * (c10 - c00);
            double c1 = c01 + ty * (c11 - c01);
            u[c] = c0 + tz * (c1 - c0);
            if (J != null) {
                double dx0 = (v100 - v000) * (1 - ty) + (v110 - v010) * ty;
                double dx1 = (v101 - v001) * (1 - ty) + (v111 - v011) * ty;
                double dy0 = c10 - c00;
                double dy1 = c11 - c01;
                J[3 * c] = ((1 - tz) * dx0 + tz * dx1) / s;
                J[3 * c + 1] = ((1 - tz) * dy0 + tz * dy1) / s;
                J[3 * c + 2] = (c1 - c0) / s;
            }
        }
    }

    private static double clamp(double f, int hi) {
        return f < 0 ? 0 : (f > hi ? hi : f);
    }

    /**
     * Extends a field known on some voxels to all voxels: each pass gives every unknown voxel with
     * known face neighbours their mean (from the previous pass, so the result does not depend on the
     * visiting order), until all are known. Modifies the arrays and {@code known} in place.
     */
    static void extend(Grid3 g, float[] ux, float[] uy, float[] uz, boolean[] known) {
        int nx = g.nx();
        int ny = g.ny();
        int nz = g.nz();
        int n = g.size();
        int remaining = 0;
        for (boolean b : known) {
            if (!b) {
                remaining++;
            }
        }
        if (remaining == n) {
            throw new IllegalStateException("no displacement samples inside the mesh");
        }
        int[] front = new int[n];
        float[] nvx = new float[n];
        float[] nvy = new float[n];
        float[] nvz = new float[n];
        while (remaining > 0) {
            int count = 0;
            for (int k = 0; k < nz; k++) {
                for (int j = 0; j < ny; j++) {
                    for (int i = 0; i < nx; i++) {
                        int v = i + nx * (j + ny * k);
                        if (known[v]) {
                            continue;
                        }
                        double sx = 0;
                        double sy = 0;
                        double sz = 0;
                        int m = 0;
                        for (int f = 0; f < 6; f++) {
                            int w = faceNeighbour(f, v, i, j, k, nx, ny, nz);
                            if (w >= 0 && known[w]) {
                                sx += ux[w];
                                sy += uy[w];
                                sz += uz[w];
                                m++;
                            }
                        }
                        if (m > 0) {
                            front[count] = v;
                            nvx[count] = (float) (sx / m);
                            nvy[count] = (float) (sy / m);
                            nvz[count] = (float) (sz / m);
                            count++;
                        }
                    }
                }
            }
            for (int c = 0; c < count; c++) {
                int v = front[c];
                ux[v] = nvx[c];
                uy[v] = nvy[c];
                uz[v] = nvz[c];
                known[v] = true;
            }
            remaining -= count;
        }
    }

    /** Flat index of face neighbour f (0..5: −x, +x, −y, +y, −z, +z) of voxel v, or −1 outside the grid. */
    private static int faceNeighbour(int f, int v, int i, int j, int k, int nx, int ny, int nz) {
        switch (f) {
            case 0:
                return i > 0 ? v - 1 : -1;
            case 1:
                return i < nx - 1 ? v + 1 : -1;
            case 2:
                return j > 0 ? v - nx : -1;
            case 3:
                return j < ny - 1 ? v + nx : -1;
            case 4:
                return k > 0 ? v - nx * ny : -1;
            default:
                return k < nz - 1 ? v + nx * ny : -1;
        }
    }
}
