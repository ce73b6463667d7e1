package org.turnmark.app.phantom;

/**
 * One breast of the reference (gravity-free) anatomy: a hemi-ellipsoidal mound standing on the chest
 * wall, drooping towards inferior with ptosis, with a small nipple bump at its apex.
 *
 * <p>Local frame: origin {@code C} on the chest-wall surface, unit axes {@code e_n} (mound axis,
 * the torso's outward normal at the base, pointing anterior and slightly lateral), {@code e_l}
 * (lateral, tangent to the torso) and {@code e_z} (superior). A point with local coordinates
 * (l, n, z) is inside the mound when
 * {@code q² = (l/a_l)² + (n/a_n)² + ((z + κ n²)/a_z)² < 1}, where {@code κ n²} shifts the
 * cross-section at height n towards inferior (ptosis: {@code κ = 0.35 p a_z / a_n²}, so the apex
 * sits {@code 0.35 p a_z} below the base centre). The approximate signed distance to the mound
 * surface is {@code (1 − q)/|∇q|} (first order, exact on a sphere). All coordinates RAS mm.
 * Immutable.
 */
final class BreastMound {

    /** Nipple bump radius (mm). */
    static final double NIPPLE_RADIUS_MM = 5.0;

    final double side;
    final double[] c;
    final double[] en;
    final double[] el;
    final double al;
    final double an;
    final double az;
    final double kappa;
    final double[] nippleCentre;
    final double ptosisDropMm;

    /**
     * @param side       +1 right breast (x > 0), −1 left
     * @param c          base centre on the chest wall (RAS mm)
     * @param en         unit mound axis (copied)
     * @param al         lateral half-width a_l (mm)
     * @param an         protrusion a_n from the chest wall (mm)
     * @param az         vertical half-height a_z (mm)
     * @param ptosis     droop in [0, 1]
     */
    BreastMound(double side, double[] c, double[] en, double al, double an, double az, double ptosis) {
        this.side = side;
        this.c = c.clone();
        this.en = en.clone();
        // e_l = side · (e_n × e_z): lateral, tangent to the torso; e_z = (0, 0, 1).
        this.el = new double[] {side * en[1], -side * en[0], 0};
        this.al = al;
        this.an = an;
        this.az = az;
        this.ptosisDropMm = 0.35 * ptosis * az;
        this.kappa = ptosisDropMm / (an * an);
        // The bump centre sits just inside the apex so that the bump protrudes by about 4 mm.
        double[] apex = local(0, an, -ptosisDropMm);
        this.nippleCentre = new double[] {apex[0] - en[0], apex[1] - en[1], apex[2] - en[2]};
    }

    /** World point of local coordinates (l, n, z). */
    double[] local(double l, double n, double z) {
        return new double[] {
            c[0] + l * el[0] + n * en[0],
            c[1] + l * el[1] + n * en[1],
            c[2] + l * el[2] + n * en[2] + z};
    }

    /** Local coordinates (l, n, z) of a world point, written into {@code out}. */
    void toLocal(double x, double y, double z, double[] out) {
        double dx = x - c[0];
        double dy = y - c[1];
        double dz = z - c[2];
        out[0] = dx * el[0] + dy * el[1] + dz * el[2];
        out[1] = dx * en[0] + dy * en[1] + dz * en[2];
        out[2] = dz;
    }

    /** Approximate signed distance (mm) to the mound surface, positive inside (bump excluded). */
    double depth(double x, double y, double z) {
        double dx = x - c[0];
        double dy = y - c[1];
        double dz = z - c[2];
        double l = dx * el[0] + dy * el[1];
        double n = dx * en[0] + dy * en[1];
        double zp = dz + kappa * n * n;
        double ql = l / al;
        double qn = n / an;
        double qz = zp / az;
        double q = Math.sqrt(ql * ql + qn * qn + qz * qz);
        if (q < 1e-9) {
            return Math.min(al, Math.min(an, az));
        }
        // ∇q in the local orthonormal frame (z' depends on n through the ptosis term).
        double gl = l / (al * al * q);
        double gz = zp / (az * az * q);
        double gn = (n / (an * an) + 2 * kappa * n * zp / (az * az)) / q;
        double g = Math.sqrt(gl * gl + gn * gn + gz * gz);
        return (1 - q) / g;
    }

    /** Signed distance (mm) to the nipple bump sphere, positive inside. */
    double nippleDepth(double x, double y, double z) {
        double dx = x - nippleCentre[0];
        double dy = y - nippleCentre[1];
        double dz = z - nippleCentre[2];
        return NIPPLE_RADIUS_MM - Math.sqrt(dx * dx + dy * dy + dz * dz);
    }

    /** "right" or "left". */
    String sideName() {
        return side > 0 ? "right" : "left";
    }
}
