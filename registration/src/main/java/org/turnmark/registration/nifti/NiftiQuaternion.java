package org.turnmark.registration.nifti;

import org.turnmark.geom.Affine3D;

/**
 * The NIfTI-1 qform: voxel→world from a unit quaternion, voxel sizes, {@code qfac} and an offset,
 * and back.
 *
 * <p>Definition ({@code nifti1.h}, "Method 2"): with {@code a = sqrt(1 − b² − c² − d²)},
 * <pre>
 *     [ a²+b²−c²−d²   2(bc−ad)     2(bd+ac)    ]
 * R = [ 2(bc+ad)      a²+c²−b²−d²  2(cd−ab)    ]
 *     [ 2(bd−ac)      2(cd+ab)     a²+d²−c²−b² ]
 *
 * [x y z]ᵀ = R · [pixdim1·i, pixdim2·j, qfac·pixdim3·k]ᵀ + [qoffset_x, qoffset_y, qoffset_z]ᵀ
 * </pre>
 * When {@code 1 − (b² + c² + d²)} falls below {@link #SMALL_A_THRESHOLD}, {@code a} is set to 0 and
 * (b, c, d) renormalised to unit length, as the reference C library ({@code nifti1_io.c},
 * {@code nifti_quatern_to_mat44}) does; without this, files whose quaternion was rounded to float32
 * near a 180° rotation differ by up to about 1e-4 mm. Units are whatever the header's are; callers
 * convert to mm. Stateless and thread safe.
 */
public final class NiftiQuaternion {

    /** Below this value of 1 − (b² + c² + d²), a = 0 and (b, c, d) is renormalised (nifti1_io.c). */
    public static final double SMALL_A_THRESHOLD = 1e-7;

    /**
     * Largest |cosine| between two normalised columns for which a linear part counts as orthogonal
     * (so that a qform can represent it): float32 storage of an exactly orthogonal sform gives
     * cosines of about 1e-7, a real shear is orders of magnitude larger.
     */
    public static final double ORTHOGONALITY_TOLERANCE = 1e-5;

    /** The quaternion parameters of a qform, as stored in the header (lengths in the header's units). */
    public record Params(double b, double c, double d,
                         double qoffsetX, double qoffsetY, double qoffsetZ,
                         double dx, double dy, double dz, double qfac) {
    }

    private NiftiQuaternion() {
    }

    /**
     * Voxel→world map of a qform.
     *
     * <p>Arguments: quaternion {@code quatern_b/c/d} (b, c, d); offset {@code qoffset_x/y/z}
     * (qx, qy, qz); voxel sizes {@code pixdim[1..3]} (dx, dy, dz), each finite and &gt; 0; qfac
     * negative for a left-handed voxel grid (only its sign is used).
     *
     * @throws IllegalArgumentException if a parameter is not finite or a voxel size is not &gt; 0
     */
    public static Affine3D toAffine(double b, double c, double d, double qx, double qy, double qz,
                                    double dx, double dy, double dz, double qfac) {
        double[] all = {b, c, d, qx, qy, qz, dx, dy, dz, qfac};
        for (double v : all) {
            if (!Double.isFinite(v)) {
                throw new IllegalArgumentException("qform parameters must be finite, got " + java.util.Arrays.toString(all));
            }
        }
        if (!(dx > 0 && dy > 0 && dz > 0)) {
            throw new IllegalArgumentException("voxel sizes must be > 0, got " + dx + ", " + dy + ", " + dz);
        }
        double bcd = b * b + c * c + d * d;
        double a = 1.0 - bcd;
        if (a < SMALL_A_THRESHOLD) {
            // nifti1_io.c: 180-degree rotation; put (b, c, d) back on the unit sphere.
            if (!(bcd > 0)) {
                throw new IllegalArgumentException("quaternion (b, c, d) must not be zero here");
            }
            double s = 1.0 / Math.sqrt(bcd);
            b *= s;
            c *= s;
            d *= s;
            a = 0.0;
        } else {
            a = Math.sqrt(a);
        }
        double zd = qfac < 0 ? -dz : dz;
        double r11 = a * a + b * b - c * c - d * d;
        double r12 = 2 * (b * c - a * d);
        double r13 = 2 * (b * d + a * c);
        double r21 = 2 * (b * c + a * d);
        double r22 = a * a + c * c - b * b - d * d;
        double r23 = 2 * (c * d - a * b);
        double r31 = 2 * (b * d - a * c);
        double r32 = 2 * (c * d + a * b);
        double r33 = a * a + d * d - c * c - b * b;
        return new Affine3D(
                r11 * dx, r12 * dy, r13 * zd, qx,
                r21 * dx, r22 * dy, r23 * zd, qy,
                r31 * dx, r32 * dy, r33 * zd, qz);
    }

    /** True if the three columns of the linear part are non-zero and mutually orthogonal. */
    public static boolean hasOrthogonalColumns(Affine3D affine) {
        double[] m = affine.toRowMajor();
        double[] n = new double[3];
        for (int c = 0; c < 3; c++) {
            n[c] = affine.columnNorm(c);
            if (!(n[c] > 0)) {
                return false;
            }
        }
        for (int p = 0; p < 3; p++) {
            for (int q = p + 1; q < 3; q++) {
                double dot = m[p] * m[q] + m[4 + p] * m[4 + q] + m[8 + p] * m[8 + q];
                if (Math.abs(dot / (n[p] * n[q])) > ORTHOGONALITY_TOLERANCE) {
                    return false;
                }
            }
        }
        return true;
    }

    /**
     * Quaternion parameters that reproduce {@code affine} through {@link #toAffine}: voxel sizes
     * are the column lengths, {@code qfac} = −1 when the determinant is negative (the third column
     * is then flipped before the rotation is converted), and the quaternion is taken with a ≥ 0
     * (branches as in {@code nifti_mat44_to_quatern}, nifti1_io.c).
     *
     * @throws IllegalArgumentException if the columns are not orthogonal (see
     *                                  {@link #hasOrthogonalColumns}): a qform cannot hold a shear
     */
    public static Params fromAffine(Affine3D affine) {
        if (!hasOrthogonalColumns(affine)) {
            throw new IllegalArgumentException("a qform needs orthogonal, non-zero columns, got " + affine);
        }
        double[] m = affine.toRowMajor();
        double dx = affine.columnNorm(0);
        double dy = affine.columnNorm(1);
        double dz = affine.columnNorm(2);
        double r11 = m[0] / dx;
        double r21 = m[4] / dx;
        double r31 = m[8] / dx;
        double r12 = m[1] / dy;
        double r22 = m[5] / dy;
        double r32 = m[9] / dy;
        double r13 = m[2] / dz;
        double r23 = m[6] / dz;
        double r33 = m[10] / dz;
        double det = r11 * (r22 * r33 - r23 * r32) - r12 * (r21 * r33 - r23 * r31) + r13 * (r21 * r32 - r22 * r31);
        double qfac = 1.0;
        if (det < 0) {
            qfac = -1.0;
            r13 = -r13;
            r23 = -r23;
            r33 = -r33;
        }
        double a = r11 + r22 + r33 + 1.0;
        double b;
        double c;
        double d;
        if (a > 0.5) {
            a = 0.5 * Math.sqrt(a);
            b = 0.25 * (r32 - r23) / a;
            c = 0.25 * (r13 - r31) / a;
            d = 0.25 * (r21 - r12) / a;
        } else {
            double xd = 1.0 + r11 - (r22 + r33);
            double yd = 1.0 + r22 - (r11 + r33);
            double zd = 1.0 + r33 - (r11 + r22);
            if (xd > 1.0) {
                b = 0.5 * Math.sqrt(xd);
                c = 0.25 * (r12 + r21) / b;
                d = 0.25 * (r13 + r31) / b;
                a = 0.25 * (r32 - r23) / b;
            } else if (yd > 1.0) {
                c = 0.5 * Math.sqrt(yd);
                b = 0.25 * (r12 + r21) / c;
                d = 0.25 * (r23 + r32) / c;
                a = 0.25 * (r13 - r31) / c;
            } else {
                d = 0.5 * Math.sqrt(zd);
                b = 0.25 * (r13 + r31) / d;
                c = 0.25 * (r23 + r32) / d;
                a = 0.25 * (r21 - r12) / d;
            }
            if (a < 0) {
                b = -b;
                c = -c;
                d = -d;
            }
        }
        return new Params(b, c, d, m[3], m[7], m[11], dx, dy, dz, qfac);
    }
}
