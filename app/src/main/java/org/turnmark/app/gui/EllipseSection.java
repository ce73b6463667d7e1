package org.turnmark.app.gui;

/**
 * The outline where an ellipsoid meets a plane of constant world coordinate, for drawing uncertainty
 * ellipsoids on orthogonal slices. The ellipsoid is {@code (x − c)ᵀ A (x − c) ≤ 1} with
 * {@code A = Σᵢ vᵢ vᵢᵀ / sᵢ²} built from unit axis directions {@code vᵢ} and semi-axes {@code sᵢ} (mm).
 * Fixing coordinate f at {@code d_f = plane − c_f} leaves a conic in the two free coordinates
 * {@code p = (d_a, d_b)}: {@code pᵀ M p + 2 gᵀ p + A_ff d_f² ≤ 1} with M the free 2×2 block and
 * {@code g = A_{·f} d_f}; completing the square gives the centre {@code −M⁻¹ g} and the level
 * {@code r = 1 − A_ff d_f² + gᵀ M⁻¹ g}, so the section is the ellipse {@code qᵀ M q = r} (empty if
 * r ≤ 0). Plain Java, immutable results.
 */
public final class EllipseSection {

    private EllipseSection() {
    }

    /**
     * An ellipse in a slice plane, in world mm along the plane's horizontal ({@code u}) and vertical
     * ({@code v}) axes.
     *
     * @param centerU     centre along the horizontal world axis (mm)
     * @param centerV     centre along the vertical world axis (mm)
     * @param semiAxis1   first semi-axis (mm), along direction (cos θ, sin θ) in (u, v)
     * @param semiAxis2   second semi-axis (mm), perpendicular to the first
     * @param angleRad    θ, angle of the first semi-axis from the u axis
     */
    public record Ellipse(double centerU, double centerV, double semiAxis1, double semiAxis2, double angleRad) {

        /** {@code n} points on the outline as world (u, v) pairs {@code [u0, v0, u1, v1, ...]}. */
        public double[] outline(int n) {
            double[] out = new double[2 * n];
            double c = Math.cos(angleRad);
            double s = Math.sin(angleRad);
            for (int t = 0; t < n; t++) {
                double phi = 2 * Math.PI * t / n;
                double a = semiAxis1 * Math.cos(phi);
                double b = semiAxis2 * Math.sin(phi);
                out[2 * t] = centerU + c * a - s * b;
                out[2 * t + 1] = centerV + s * a + c * b;
            }
            return out;
        }
    }

    /**
     * The section of an ellipsoid by the plane {@code x[plane.fixedAxis()] = fixedMm}.
     *
     * @param centerRasMm  ellipsoid centre (RAS mm), length 3
     * @param axes         unit axis directions, {@code axes[i]} of length 3 (need not be exactly unit:
     *                     they are normalised)
     * @param semiAxesMm   semi-axis lengths (mm), &gt; 0
     * @param plane        the view whose fixed axis defines the plane
     * @param fixedMm      plane position along that axis (mm)
     * @return the ellipse, or null if the plane misses the ellipsoid
     */
    public static Ellipse section(double[] centerRasMm, double[][] axes, double[] semiAxesMm,
                                  SlicePlane plane, double fixedMm) {
        double[][] a = new double[3][3];
        for (int i = 0; i < 3; i++) {
            double[] v = axes[i];
            double norm = Math.sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
            double s = semiAxesMm[i];
            if (!(norm > 0) || !(s > 0)) {
                throw new IllegalArgumentException("ellipsoid axis " + i + " needs a non-zero direction and a "
                        + "semi-axis > 0 mm, got |v| = " + norm + ", s = " + s + " mm");
            }
            double w = 1.0 / (norm * norm * s * s);
            for (int r = 0; r < 3; r++) {
                for (int c = 0; c < 3; c++) {
                    a[r][c] += w * v[r] * v[c];
                }
            }
        }
        int f = plane.fixedAxis();
        int u = plane.horizontalAxis();
        int vv = plane.verticalAxis();
        double df = fixedMm - centerRasMm[f];
        double m00 = a[u][u];
        double m01 = a[u][vv];
        double m11 = a[vv][vv];
        double g0 = a[u][f] * df;
        double g1 = a[vv][f] * df;
        double det = m00 * m11 - m01 * m01;
        // M^-1 g
        double q0 = (m11 * g0 - m01 * g1) / det;
        double q1 = (-m01 * g0 + m00 * g1) / det;
        double r = 1.0 - a[f][f] * df * df + (g0 * q0 + g1 * q1);
        if (!(r > 0)) {
            return null;
        }
        // Eigen-decomposition of the symmetric 2×2 M: λ = mean ± sqrt(((m00 − m11)/2)² + m01²).
        double mean = 0.5 * (m00 + m11);
        double rad = Math.hypot(0.5 * (m00 - m11), m01);
        double l1 = mean - rad;
        double l2 = mean + rad;
        double theta = 0.5 * Math.atan2(2 * m01, m00 - m11) + Math.PI / 2;
        if (rad == 0) {
            theta = 0;
        }
        // Along eigenvector of λ (qᵀ M q = r): semi-axis sqrt(r / λ).
        return new Ellipse(centerRasMm[u] - q0, centerRasMm[vv] - q1, Math.sqrt(r / l1), Math.sqrt(r / l2), theta);
    }
}
