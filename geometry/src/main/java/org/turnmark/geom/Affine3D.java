package org.turnmark.geom;

import java.util.Arrays;

/**
 * An immutable 3-D affine map {@code x' = A x + t}, stored as the 12 upper entries of a 4×4
 * homogeneous matrix whose last row is {@code [0 0 0 1]}.
 *
 * <p>Conventions: entry {@code mRC} is row R, column C; {@link #toRowMajor()} returns the full 4×4
 * matrix in row-major order. Used for voxel→world maps (columns 0..2 are the world-mm steps of one
 * voxel along i, j, k; column 3 is the world position of voxel (0,0,0)), world→voxel maps and rigid
 * or affine alignments in RAS+ millimetres. Thread safe (immutable).
 */
public final class Affine3D {

    /** Largest |det A| treated as singular when inverting. */
    public static final double SINGULAR_DETERMINANT = 1e-12;

    private static final Affine3D IDENTITY = new Affine3D(1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0);

    private final double m00;
    private final double m01;
    private final double m02;
    private final double m03;
    private final double m10;
    private final double m11;
    private final double m12;
    private final double m13;
    private final double m20;
    private final double m21;
    private final double m22;
    private final double m23;

    /** Builds the map from its 12 upper entries, row by row. All must be finite. */
    public Affine3D(double m00, double m01, double m02, double m03,
                    double m10, double m11, double m12, double m13,
                    double m20, double m21, double m22, double m23) {
        this.m00 = m00;
        this.m01 = m01;
        this.m02 = m02;
        this.m03 = m03;
        this.m10 = m10;
        this.m11 = m11;
        this.m12 = m12;
        this.m13 = m13;
        this.m20 = m20;
        this.m21 = m21;
        this.m22 = m22;
        this.m23 = m23;
        double[] all = {m00, m01, m02, m03, m10, m11, m12, m13, m20, m21, m22, m23};
        for (int n = 0; n < all.length; n++) {
            if (!Double.isFinite(all[n])) {
                throw new IllegalArgumentException("affine entry (" + n / 4 + "," + n % 4
                        + ") must be finite, got " + all[n]);
            }
        }
    }

    /** The identity map. */
    public static Affine3D identity() {
        return IDENTITY;
    }

    /** A pure translation by (tx, ty, tz) mm. */
    public static Affine3D translation(double tx, double ty, double tz) {
        return new Affine3D(1, 0, 0, tx, 0, 1, 0, ty, 0, 0, 1, tz);
    }

    /** A diagonal scaling (for example voxel spacing in mm). */
    public static Affine3D scaling(double sx, double sy, double sz) {
        return new Affine3D(sx, 0, 0, 0, 0, sy, 0, 0, 0, 0, sz, 0);
    }

    /**
     * Rotation by {@code angleRad} about the unit axis (ax, ay, az) through the origin
     * (Rodrigues' formula). The axis is normalised here; a zero axis is rejected.
     */
    public static Affine3D rotation(double ax, double ay, double az, double angleRad) {
        double n = Math.sqrt(ax * ax + ay * ay + az * az);
        if (!(n > 0)) {
            throw new IllegalArgumentException("rotation axis must be non-zero, got (" + ax + ", " + ay + ", " + az + ")");
        }
        double x = ax / n;
        double y = ay / n;
        double z = az / n;
        double c = Math.cos(angleRad);
        double s = Math.sin(angleRad);
        double t = 1 - c;
        return new Affine3D(
                t * x * x + c, t * x * y - s * z, t * x * z + s * y, 0,
                t * x * y + s * z, t * y * y + c, t * y * z - s * x, 0,
                t * x * z - s * y, t * y * z + s * x, t * z * z + c, 0);
    }

    /**
     * Builds the map from a 4×4 row-major array (16 values) or its first 12 values. The last row,
     * if given, must be {@code [0 0 0 1]} to within 1e-9.
     */
    public static Affine3D fromRowMajor(double[] m) {
        if (m.length != 12 && m.length != 16) {
            throw new IllegalArgumentException("affine needs 12 or 16 row-major values, got " + m.length);
        }
        if (m.length == 16) {
            double tol = 1e-9;
            if (Math.abs(m[12]) > tol || Math.abs(m[13]) > tol || Math.abs(m[14]) > tol || Math.abs(m[15] - 1) > tol) {
                throw new IllegalArgumentException("affine last row must be [0 0 0 1], got "
                        + Arrays.toString(Arrays.copyOfRange(m, 12, 16)));
            }
        }
        return new Affine3D(m[0], m[1], m[2], m[3], m[4], m[5], m[6], m[7], m[8], m[9], m[10], m[11]);
    }

    /** The full 4×4 matrix, row-major, as a new array of 16 values. */
    public double[] toRowMajor() {
        return new double[] {m00, m01, m02, m03, m10, m11, m12, m13, m20, m21, m22, m23, 0, 0, 0, 1};
    }

    /** Entry at row {@code r} (0..3) and column {@code c} (0..3); no allocation. */
    public double get(int r, int c) {
        if (r < 0 || r > 3 || c < 0 || c > 3) {
            throw new IndexOutOfBoundsException("affine entry (" + r + "," + c + ") outside 4x4");
        }
        if (r == 3) {
            return c == 3 ? 1 : 0;
        }
        switch (4 * r + c) {
            case 0: return m00;
            case 1: return m01;
            case 2: return m02;
            case 3: return m03;
            case 4: return m10;
            case 5: return m11;
            case 6: return m12;
            case 7: return m13;
            case 8: return m20;
            case 9: return m21;
            case 10: return m22;
            default: return m23;
        }
    }

    /**
     * Applies the map to a point. {@code out} must have length ≥ 3 and may alias {@code in}.
     *
     * @param in  point (length ≥ 3), not modified unless it aliases {@code out}
     * @param out receives A·in + t
     */
    public void applyPoint(double[] in, double[] out) {
        double x = in[0];
        double y = in[1];
        double z = in[2];
        out[0] = m00 * x + m01 * y + m02 * z + m03;
        out[1] = m10 * x + m11 * y + m12 * z + m13;
        out[2] = m20 * x + m21 * y + m22 * z + m23;
    }

    /** Applies the map to a point, returning a new array of 3. */
    public double[] applyPoint(double x, double y, double z) {
        return new double[] {
            m00 * x + m01 * y + m02 * z + m03,
            m10 * x + m11 * y + m12 * z + m13,
            m20 * x + m21 * y + m22 * z + m23};
    }

    /** Applies the linear part only (no translation) to a vector. {@code out} may alias {@code in}. */
    public void applyVector(double[] in, double[] out) {
        double x = in[0];
        double y = in[1];
        double z = in[2];
        out[0] = m00 * x + m01 * y + m02 * z;
        out[1] = m10 * x + m11 * y + m12 * z;
        out[2] = m20 * x + m21 * y + m22 * z;
    }

    /** Determinant of the linear 3×3 part. */
    public double determinant() {
        return m00 * (m11 * m22 - m12 * m21) - m01 * (m10 * m22 - m12 * m20) + m02 * (m10 * m21 - m11 * m20);
    }

    /**
     * The inverse map.
     *
     * @throws IllegalStateException if |det A| ≤ {@link #SINGULAR_DETERMINANT}
     */
    public Affine3D inverse() {
        double det = determinant();
        if (!(Math.abs(det) > SINGULAR_DETERMINANT)) {
            throw new IllegalStateException("affine is singular (det = " + det + "), cannot invert");
        }
        double inv = 1.0 / det;
        // Adjugate / determinant for the 3x3 block, then t' = -A^-1 t.
        double a00 = (m11 * m22 - m12 * m21) * inv;
        double a01 = (m02 * m21 - m01 * m22) * inv;
        double a02 = (m01 * m12 - m02 * m11) * inv;
        double a10 = (m12 * m20 - m10 * m22) * inv;
        double a11 = (m00 * m22 - m02 * m20) * inv;
        double a12 = (m02 * m10 - m00 * m12) * inv;
        double a20 = (m10 * m21 - m11 * m20) * inv;
        double a21 = (m01 * m20 - m00 * m21) * inv;
        double a22 = (m00 * m11 - m01 * m10) * inv;
        double t0 = -(a00 * m03 + a01 * m13 + a02 * m23);
        double t1 = -(a10 * m03 + a11 * m13 + a12 * m23);
        double t2 = -(a20 * m03 + a21 * m13 + a22 * m23);
        return new Affine3D(a00, a01, a02, t0, a10, a11, a12, t1, a20, a21, a22, t2);
    }

    /** The composition {@code this ∘ other}: first {@code other}, then {@code this}. */
    public Affine3D compose(Affine3D o) {
        return new Affine3D(
                m00 * o.m00 + m01 * o.m10 + m02 * o.m20,
                m00 * o.m01 + m01 * o.m11 + m02 * o.m21,
                m00 * o.m02 + m01 * o.m12 + m02 * o.m22,
                m00 * o.m03 + m01 * o.m13 + m02 * o.m23 + m03,
                m10 * o.m00 + m11 * o.m10 + m12 * o.m20,
                m10 * o.m01 + m11 * o.m11 + m12 * o.m21,
                m10 * o.m02 + m11 * o.m12 + m12 * o.m22,
                m10 * o.m03 + m11 * o.m13 + m12 * o.m23 + m13,
                m20 * o.m00 + m21 * o.m10 + m22 * o.m20,
                m20 * o.m01 + m21 * o.m11 + m22 * o.m21,
                m20 * o.m02 + m21 * o.m12 + m22 * o.m22,
                m20 * o.m03 + m21 * o.m13 + m22 * o.m23 + m23);
    }

    /** Length (mm) of column {@code c} (0..2) of the linear part: the voxel spacing along that axis. */
    public double columnNorm(int c) {
        double a = get(0, c);
        double b = get(1, c);
        double d = get(2, c);
        return Math.sqrt(a * a + b * b + d * d);
    }

    /** Largest absolute entry-wise difference to {@code o}. */
    public double maxAbsDifference(Affine3D o) {
        double[] a = toRowMajor();
        double[] b = o.toRowMajor();
        double d = 0;
        for (int n = 0; n < 12; n++) {
            d = Math.max(d, Math.abs(a[n] - b[n]));
        }
        return d;
    }

    /**
     * Orientation letters of the three voxel axes for a RAS+ world: for each column of the linear
     * part, the letter of the world axis it is most aligned with and its sign ({@code R/L},
     * {@code A/P}, {@code S/I}), e.g. "RAS" or "LPS". Ties between world axes are broken in the order
     * x, y, z; if two columns pick the same world axis the later one takes the next best free axis.
     */
    public String orientationLetters() {
        double[] m = toRowMajor();
        char[][] letters = {{'R', 'L'}, {'A', 'P'}, {'S', 'I'}};
        boolean[] used = new boolean[3];
        StringBuilder sb = new StringBuilder(3);
        for (int c = 0; c < 3; c++) {
            int best = -1;
            double bestAbs = -1;
            for (int r = 0; r < 3; r++) {
                double a = Math.abs(m[4 * r + c]);
                if (!used[r] && a > bestAbs) {
                    bestAbs = a;
                    best = r;
                }
            }
            used[best] = true;
            sb.append(m[4 * best + c] >= 0 ? letters[best][0] : letters[best][1]);
        }
        return sb.toString();
    }

    @Override
    public boolean equals(Object obj) {
        if (!(obj instanceof Affine3D)) {
            return false;
        }
        return Arrays.equals(toRowMajor(), ((Affine3D) obj).toRowMajor());
    }

    @Override
    public int hashCode() {
        return Arrays.hashCode(toRowMajor());
    }

    @Override
    public String toString() {
        return String.format(java.util.Locale.ROOT,
                "[[%.6g, %.6g, %.6g, %.6g], [%.6g, %.6g, %.6g, %.6g], [%.6g, %.6g, %.6g, %.6g], [0, 0, 0, 1]]",
                m00, m01, m02, m03, m10, m11, m12, m13, m20, m21, m22, m23);
    }
}
