package org.turnmark.registration.transform;

/**
 * Trilinear sampling of the three components of a vector field at one continuous voxel coordinate,
 * with one set of weights for all three components (the hot loop of composition and scaling and
 * squaring). Outside policy: clamp each coordinate to the closed range {@code [0, n-1]} of voxel
 * centres, i.e. the field is extended by its edge values. A displacement that stops at the border
 * keeps the map continuous; a zero fill would tear it there.
 *
 * <p>Stateless; safe for concurrent use. Allocation-free.
 */
final class FieldSampling {

    private FieldSampling() {
    }

    /**
     * Samples (fx, fy, fz) at voxel coordinate (ci, cj, ck), clamped to the grid.
     *
     * @param out receives the three interpolated components at {@code out[0..2]}; length ≥ 3
     */
    static void sample(float[] fx, float[] fy, float[] fz, int nx, int ny, int nz,
                       double ci, double cj, double ck, double[] out) {
        // Clamp first: also maps the (rejected upstream) infinities to the edge.
        double ti = ci < 0 ? 0 : (ci > nx - 1 ? nx - 1 : ci);
        double tj = cj < 0 ? 0 : (cj > ny - 1 ? ny - 1 : cj);
        double tk = ck < 0 ? 0 : (ck > nz - 1 ? nz - 1 : ck);
        int i0 = (int) ti;
        int j0 = (int) tj;
        int k0 = (int) tk;
        if (i0 > nx - 2) {
            i0 = Math.max(0, nx - 2);
        }
        if (j0 > ny - 2) {
            j0 = Math.max(0, ny - 2);
        }
        if (k0 > nz - 2) {
            k0 = Math.max(0, nz - 2);
        }
        double a = ti - i0;
        double b = tj - j0;
        double c = tk - k0;
        int di = nx > 1 ? 1 : 0;
        int dj = ny > 1 ? nx : 0;
        int dk = nz > 1 ? nx * ny : 0;
        int n000 = i0 + nx * (j0 + ny * k0);
        int n100 = n000 + di;
        int n010 = n000 + dj;
        int n110 = n010 + di;
        int n001 = n000 + dk;
        int n101 = n001 + di;
        int n011 = n001 + dj;
        int n111 = n011 + di;
        double a1 = 1 - a;
        double b1 = 1 - b;
        double c1 = 1 - c;
        double w000 = a1 * b1 * c1;
        double w100 = a * b1 * c1;
        double w010 = a1 * b * c1;
        double w110 = a * b * c1;
        double w001 = a1 * b1 * c;
        double w101 = a * b1 * c;
        double w011 = a1 * b * c;
        double w111 = a * b * c;
        out[0] = w000 * fx[n000] + w100 * fx[n100] + w010 * fx[n010] + w110 * fx[n110]
                + w001 * fx[n001] + w101 * fx[n101] + w011 * fx[n011] + w111 * fx[n111];
        out[1] = w000 * fy[n000] + w100 * fy[n100] + w010 * fy[n010] + w110 * fy[n110]
                + w001 * fy[n001] + w101 * fy[n101] + w011 * fy[n011] + w111 * fy[n111];
        out[2] = w000 * fz[n000] + w100 * fz[n100] + w010 * fz[n010] + w110 * fz[n110]
                + w001 * fz[n001] + w101 * fz[n101] + w011 * fz[n011] + w111 * fz[n111];
    }
}
