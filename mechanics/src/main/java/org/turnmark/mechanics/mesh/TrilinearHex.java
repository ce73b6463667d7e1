package org.turnmark.mechanics.mesh;

/**
 * The trilinear map of an 8-node hexahedron and its inverse.
 *
 * <p>Local coordinates (r, s, t) ∈ [0, 1]³; node a of the VTK hexahedron sits at
 * 0 (0,0,0), 1 (1,0,0), 2 (1,1,0), 3 (0,1,0), 4 (0,0,1), 5 (1,0,1), 6 (1,1,1), 7 (0,1,1), and
 * x(r, s, t) = Σₐ Nₐ(r, s, t) xₐ with Nₐ = (rₐ r + (1 − rₐ)(1 − r)) · (same in s) · (same in t)
 * (the standard isoparametric Q1 element, e.g. Hughes, The Finite Element Method, 1987, §3.5).
 * Coordinates are read from a flat array {@code xyz[3n..3n+2]} through the connectivity
 * {@code hex[8e..8e+7]}. Stateless; thread safe.
 */
public final class TrilinearHex {

    /** Local r of node a. */
    static final double[] R = {0, 1, 1, 0, 0, 1, 1, 0};
    /** Local s of node a. */
    static final double[] S = {0, 0, 1, 1, 0, 0, 1, 1};
    /** Local t of node a. */
    static final double[] T = {0, 0, 0, 0, 1, 1, 1, 1};

    /**
     * Newton stops when the local update is below this (local units, about 1e-12 of an element).
     * Far above round-off for well-shaped elements, far below any geometric tolerance in use.
     */
    public static final double NEWTON_STEP_TOLERANCE = 1e-12;

    /** Newton iterations before giving up (a trilinear map converges in ≤ 6 on sane elements). */
    public static final int NEWTON_MAX_ITERATIONS = 40;

    private TrilinearHex() {
    }

    /**
     * The 8 shape function values at (r, s, t).
     *
     * @param out length ≥ 8, overwritten
     */
    public static void shape(double r, double s, double t, double[] out) {
        double r0 = 1 - r;
        double s0 = 1 - s;
        double t0 = 1 - t;
        out[0] = r0 * s0 * t0;
        out[1] = r * s0 * t0;
        out[2] = r * s * t0;
        out[3] = r0 * s * t0;
        out[4] = r0 * s0 * t;
        out[5] = r * s0 * t;
        out[6] = r * s * t;
        out[7] = r0 * s * t;
    }

    /**
     * Evaluates Σₐ Nₐ(r,s,t) vₐ for element {@code e} of a nodal 3-vector array {@code v} (for
     * example coordinates or displacements) into {@code out[0..2]}.
     */
    public static void interpolate(int[] hex, int e, double[] v, double r, double s, double t, double[] out) {
        double r0 = 1 - r;
        double s0 = 1 - s;
        double t0 = 1 - t;
        double x = 0;
        double y = 0;
        double z = 0;
        int base = 8 * e;
        for (int a = 0; a < 8; a++) {
            double n = (R[a] == 0 ? r0 : r) * (S[a] == 0 ? s0 : s) * (T[a] == 0 ? t0 : t);
            int p = 3 * hex[base + a];
            x += n * v[p];
            y += n * v[p + 1];
            z += n * v[p + 2];
        }
        out[0] = x;
        out[1] = y;
        out[2] = z;
    }

    /**
     * The Jacobian ∂x/∂(r,s,t) of element {@code e} at (r, s, t), row-major into {@code jac[0..8]}
     * (row = world axis, column = local axis), and its determinant as the return value (mm³ per unit
     * local volume; the element's volume is the integral of this over the unit cube).
     */
    public static double jacobian(int[] hex, int e, double[] xyz, double r, double s, double t, double[] jac) {
        double j00 = 0;
        double j01 = 0;
        double j02 = 0;
        double j10 = 0;
        double j11 = 0;
        double j12 = 0;
        double j20 = 0;
        double j21 = 0;
        double j22 = 0;
        int base = 8 * e;
        for (int a = 0; a < 8; a++) {
            double fr = R[a] == 0 ? 1 - r : r;
            double fs = S[a] == 0 ? 1 - s : s;
            double ft = T[a] == 0 ? 1 - t : t;
            double dr = (R[a] == 0 ? -1 : 1) * fs * ft;
            double ds = (S[a] == 0 ? -1 : 1) * fr * ft;
            double dt = (T[a] == 0 ? -1 : 1) * fr * fs;
            int p = 3 * hex[base + a];
            double x = xyz[p];
            double y = xyz[p + 1];
            double z = xyz[p + 2];
            j00 += dr * x;
            j01 += ds * x;
            j02 += dt * x;
            j10 += dr * y;
            j11 += ds * y;
            j12 += dt * y;
            j20 += dr * z;
            j21 += ds * z;
            j22 += dt * z;
        }
        jac[0] = j00;
        jac[1] = j01;
        jac[2] = j02;
        jac[3] = j10;
        jac[4] = j11;
        jac[5] = j12;
        jac[6] = j20;
        jac[7] = j21;
        jac[8] = j22;
        return j00 * (j11 * j22 - j12 * j21) - j01 * (j10 * j22 - j12 * j20) + j02 * (j10 * j21 - j11 * j20);
    }

    /**
     * Smallest Jacobian determinant over the 8 corners of element {@code e} (mm³ per unit local
     * volume). A trilinear element is inverted or degenerate somewhere if this is ≤ 0; all corners
     * positive is the usual practical validity test (common practice; it is necessary, and for
     * mildly distorted elements sufficient).
     *
     * @param jac scratch of length ≥ 9
     */
    public static double minCornerDetJ(int[] hex, int e, double[] xyz, double[] jac) {
        double min = Double.POSITIVE_INFINITY;
        for (int a = 0; a < 8; a++) {
            min = Math.min(min, jacobian(hex, e, xyz, R[a], S[a], T[a], jac));
        }
        return min;
    }

    /**
     * Volume of element {@code e} (mm³) by 2×2×2 Gauss quadrature of det J, exact for a trilinear
     * element (det J is a polynomial of degree ≤ 2 in each local variable).
     *
     * @param jac scratch of length ≥ 9
     */
    public static double volume(int[] hex, int e, double[] xyz, double[] jac) {
        double g0 = 0.5 - 0.5 / Math.sqrt(3);
        double g1 = 0.5 + 0.5 / Math.sqrt(3);
        double v = 0;
        for (int q = 0; q < 8; q++) {
            double r = (q & 1) == 0 ? g0 : g1;
            double s = (q & 2) == 0 ? g0 : g1;
            double t = (q & 4) == 0 ? g0 : g1;
            v += jacobian(hex, e, xyz, r, s, t, jac);
        }
        return v / 8;
    }

    /**
     * Solves x(r, s, t) = p for the local coordinates of world point p in element {@code e} by
     * Newton's method from the element centre.
     *
     * @param rst out: local coordinates (length ≥ 3), valid when the method returns true
     * @param work scratch of length ≥ 12
     * @return true if Newton converged (the point may still lie outside [0,1]³: check {@code rst})
     */
    public static boolean invert(int[] hex, int e, double[] xyz, double px, double py, double pz,
                                 double[] rst, double[] work) {
        double r = 0.5;
        double s = 0.5;
        double t = 0.5;
        for (int it = 0; it < NEWTON_MAX_ITERATIONS; it++) {
            interpolate(hex, e, xyz, r, s, t, work);
            double fx = work[0] - px;
            double fy = work[1] - py;
            double fz = work[2] - pz;
            double det = jacobian(hex, e, xyz, r, s, t, work);
            if (!(Math.abs(det) > 0)) {
                return false;
            }
            double a00 = work[0];
            double a01 = work[1];
            double a02 = work[2];
            double a10 = work[3];
            double a11 = work[4];
            double a12 = work[5];
            double a20 = work[6];
            double a21 = work[7];
            double a22 = work[8];
            // Cramer's rule for J·d = f (3×3, unrolled).
            double inv = 1.0 / det;
            double dr = inv * (fx * (a11 * a22 - a12 * a21) - a01 * (fy * a22 - a12 * fz) + a02 * (fy * a21 - a11 * fz));
            double ds = inv * (a00 * (fy * a22 - a12 * fz) - fx * (a10 * a22 - a12 * a20) + a02 * (a10 * fz - fy * a20));
            double dt = inv * (a00 * (a11 * fz - fy * a21) - a01 * (a10 * fz - fy * a20) + fx * (a10 * a21 - a11 * a20));
            r -= dr;
            s -= ds;
            t -= dt;
            if (!(Math.abs(r) < 8 && Math.abs(s) < 8 && Math.abs(t) < 8)) {
                return false; // wandered far outside: the point is not in this element
            }
            if (Math.abs(dr) + Math.abs(ds) + Math.abs(dt) < NEWTON_STEP_TOLERANCE) {
                rst[0] = r;
                rst[1] = s;
                rst[2] = t;
                return true;
            }
        }
        return false;
    }
}
