package org.turnmark.registration.transform;

import org.turnmark.geom.Grid3;

/**
 * Spatial derivatives of a vector field in world millimetres: central differences along the voxel
 * axes, one-sided at the grid border, converted to world derivatives through the world→voxel
 * matrix, {@code ∂f/∂x_b = Σ_c (∂f/∂ijk_c) · W[c][b]} with {@code W} the linear part of
 * {@code grid.worldToVoxel()}. Exact for fields that are affine in x, second-order accurate otherwise.
 *
 * <p>Immutable after construction; safe for concurrent use (callers pass their own output).
 * Allocation-free per call.
 */
public final class FieldDerivatives {

    private final int nx;
    private final int ny;
    private final int nz;
    private final double w00;
    private final double w01;
    private final double w02;
    private final double w10;
    private final double w11;
    private final double w12;
    private final double w20;
    private final double w21;
    private final double w22;

    /** Derivative operator for arrays on {@code grid}. */
    public FieldDerivatives(Grid3 grid) {
        this.nx = grid.nx();
        this.ny = grid.ny();
        this.nz = grid.nz();
        double[] w = grid.worldToVoxel().toRowMajor();
        w00 = w[0];
        w01 = w[1];
        w02 = w[2];
        w10 = w[4];
        w11 = w[5];
        w12 = w[6];
        w20 = w[8];
        w21 = w[9];
        w22 = w[10];
    }

    /**
     * World-mm Jacobian of (fx, fy, fz) at voxel (i, j, k), row-major: {@code d[3*a + b] = ∂f_a/∂x_b}.
     *
     * @param d output, length ≥ 9; overwritten
     */
    public void jacobian(float[] fx, float[] fy, float[] fz, int i, int j, int k, double[] d) {
        int n = i + nx * (j + ny * k);
        // Index steps and divisors for the difference along each voxel axis (0 on a 1-voxel axis).
        int im = i > 0 ? n - 1 : n;
        int ip = i < nx - 1 ? n + 1 : n;
        int jm = j > 0 ? n - nx : n;
        int jp = j < ny - 1 ? n + nx : n;
        int sz = nx * ny;
        int km = k > 0 ? n - sz : n;
        int kp = k < nz - 1 ? n + sz : n;
        double hi = (i > 0 ? 1 : 0) + (i < nx - 1 ? 1 : 0);
        double hj = (j > 0 ? 1 : 0) + (j < ny - 1 ? 1 : 0);
        double hk = (k > 0 ? 1 : 0) + (k < nz - 1 ? 1 : 0);
        double ri = hi > 0 ? 1.0 / hi : 0;
        double rj = hj > 0 ? 1.0 / hj : 0;
        double rk = hk > 0 ? 1.0 / hk : 0;
        row(fx, im, ip, jm, jp, km, kp, ri, rj, rk, d, 0);
        row(fy, im, ip, jm, jp, km, kp, ri, rj, rk, d, 3);
        row(fz, im, ip, jm, jp, km, kp, ri, rj, rk, d, 6);
    }

    private void row(float[] f, int im, int ip, int jm, int jp, int km, int kp,
                     double ri, double rj, double rk, double[] d, int o) {
        double di = (f[ip] - f[im]) * ri;
        double dj = (f[jp] - f[jm]) * rj;
        double dk = (f[kp] - f[km]) * rk;
        d[o] = di * w00 + dj * w10 + dk * w20;
        d[o + 1] = di * w01 + dj * w11 + dk * w21;
        d[o + 2] = di * w02 + dj * w12 + dk * w22;
    }

    /**
     * World-mm gradient of a scalar array at voxel (i, j, k) into {@code g[0..2]}; same stencil as
     * {@link #jacobian}.
     */
    public void gradient(float[] f, int i, int j, int k, double[] g) {
        int n = i + nx * (j + ny * k);
        int im = i > 0 ? n - 1 : n;
        int ip = i < nx - 1 ? n + 1 : n;
        int jm = j > 0 ? n - nx : n;
        int jp = j < ny - 1 ? n + nx : n;
        int sz = nx * ny;
        int km = k > 0 ? n - sz : n;
        int kp = k < nz - 1 ? n + sz : n;
        double hi = (i > 0 ? 1 : 0) + (i < nx - 1 ? 1 : 0);
        double hj = (j > 0 ? 1 : 0) + (j < ny - 1 ? 1 : 0);
        double hk = (k > 0 ? 1 : 0) + (k < nz - 1 ? 1 : 0);
        double ri = hi > 0 ? 1.0 / hi : 0;
        double rj = hj > 0 ? 1.0 / hj : 0;
        double rk = hk > 0 ? 1.0 / hk : 0;
        row(f, im, ip, jm, jp, km, kp, ri, rj, rk, g, 0);
    }
}
