package org.turnmark.mechanics.element;

/**
 * Energy, internal force and consistent tangent of one 8-node hexahedron of compressible
 * neo-Hookean material, total Lagrangian.
 *
 * <p>Element energy, with F = I + Σ_a u_a ⊗ ∇_X N_a at the 2×2×2 Gauss points g (weights w_g
 * including det ∂X/∂ξ):
 * <pre>
 *   standard Q1:       Π_e = Σ_g w_g [ψ_iso(F_g) + U(J_g)]
 *   mean dilatation:   Π_e = Σ_g w_g ψ_iso(F_g) + V U(θ),  θ = v/V,  v = Σ_g w_g J_g,  V = Σ_g w_g
 *   ψ_iso = (μ/2)(J^(−2/3) I₁ − 3),  U(J) = (κ/4)(J² − 1 − 2 ln J)
 * </pre>
 * The mean-dilatation energy is the three-field Q1/P0 element with element-constant pressure and
 * dilatation condensed out (Simo, Taylor &amp; Pister 1985); being a potential, its tangent is
 * symmetric. Internal force f_ai = ∂Π_e/∂u_ai and tangent K_ai,bk = ∂²Π_e/∂u_ai∂u_bk in closed
 * form: with n_a = ∇_X N_a, f_a = F n_a and g_a = F⁻ᵀ n_a (the spatial gradient),
 * <pre>
 *   P_iso = μ J^(−2/3) (F − (I₁/3) F⁻ᵀ)
 *   K_iso(a,b)_ik = μ J^(−2/3) [δ_ik n_a·n_b − ⅔(f_ai g_bk + g_ai f_bk) + (2/9) I₁ g_ai g_bk + (I₁/3) g_bi g_ak]
 *   K_vol(a,b)_ik = J(U' + J U'') g_ai g_bk − J U' g_bi g_ak                 (Q1, per Gauss point)
 *   K_vol(a,b)_ik = p J (g_ai g_bk − g_bi g_ak) + (U''(θ)/V) d_ai d_bk,      (mean dilatation)
 *                   p = U'(θ),  d_a = Σ_g w_g J_g g_a = ∂v/∂u_a
 * </pre>
 * Units: lengths mm, moduli kPa, so forces are mN and energies mN·mm (µJ).
 *
 * <p>Not thread safe: an instance keeps scratch arrays; use one instance per thread.
 */
public final class HexKernel {

    /** ∂N_a/∂ξ at the element centre (ξ = 0), 3 per node; shape-function constants, read-only. */
    private static final double[] CENTRE_DN_DXI = centreShapeDerivatives();

    private final double[] fg = new double[72];   // F per Gauss point, row-major
    private final double[] hg = new double[72];   // F⁻ᵀ per Gauss point
    private final double[] jg = new double[8];
    private final double[] cg = new double[8];    // μ J^(−2/3) per Gauss point
    private final double[] i1g = new double[8];   // I₁ per Gauss point
    private final double[] fa = new double[24];   // F n_a
    private final double[] ga = new double[24];   // F⁻ᵀ n_a
    private final double[] d = new double[24];    // ∂v/∂u
    private final double[] vb = new double[24];   // tt F n_b + gg F⁻ᵀ n_b (tangent scratch)
    private final double[] wb = new double[24];   // tt F⁻ᵀ n_b (tangent scratch)
    private double minDetF;

    /** Smallest det F at the Gauss points of the last {@link #evaluate} call. */
    public double minDetF() {
        return minDetF;
    }

    /**
     * Evaluates one element.
     *
     * @param geo   reference geometry of the mesh
     * @param e     element index
     * @param ue    nodal displacements of the element, 24 values (node a, component i at 3a+i), mm;
     *              not modified
     * @param mu    shear modulus, kPa
     * @param kappa bulk modulus, kPa
     * @param form  formulation
     * @param fe    out (may be null): internal force, 24 values, mN (overwritten)
     * @param ke    out (may be null): tangent, 24×24 row-major, mN/mm (overwritten)
     * @return element strain energy, mN·mm; +∞ (outputs undefined) if det F ≤ 0 at a Gauss point or
     *         θ ≤ 0; outputs must not alias {@code ue}
     */
    public double evaluate(ReferenceGeometry geo, int e, double[] ue, double mu, double kappa,
                           HexFormulation form, double[] fe, double[] ke) {
        final double[] grad = geo.gradX();
        final double[] wts = geo.weight();
        final boolean md = form == HexFormulation.MEAN_DILATATION;
        double energy = 0;
        double vol = 0;
        double vcur = 0;
        double minJ = Double.POSITIVE_INFINITY;
        for (int g = 0; g < 8; g++) {
            int gb = 192 * e + 24 * g;
            // F_iJ = δ_iJ + Σ_a u_ai ∂N_a/∂X_J
            double f00 = 1, f01 = 0, f02 = 0, f10 = 0, f11 = 1, f12 = 0, f20 = 0, f21 = 0, f22 = 1;
            for (int a = 0; a < 8; a++) {
                double n0 = grad[gb + 3 * a];
                double n1 = grad[gb + 3 * a + 1];
                double n2 = grad[gb + 3 * a + 2];
                double u0 = ue[3 * a];
                double u1 = ue[3 * a + 1];
                double u2 = ue[3 * a + 2];
                f00 += u0 * n0;
                f01 += u0 * n1;
                f02 += u0 * n2;
                f10 += u1 * n0;
                f11 += u1 * n1;
                f12 += u1 * n2;
                f20 += u2 * n0;
                f21 += u2 * n1;
                f22 += u2 * n2;
            }
            double c00 = f11 * f22 - f12 * f21;
            double c01 = f12 * f20 - f10 * f22;
            double c02 = f10 * f21 - f11 * f20;
            double j = f00 * c00 + f01 * c01 + f02 * c02;
            if (j < minJ) {
                minJ = j;
            }
            if (!(j > 0)) {
                minDetF = minJ;
                return Double.POSITIVE_INFINITY;
            }
            double ij = 1 / j;
            int o = 9 * g;
            fg[o] = f00;
            fg[o + 1] = f01;
            fg[o + 2] = f02;
            fg[o + 3] = f10;
            fg[o + 4] = f11;
            fg[o + 5] = f12;
            fg[o + 6] = f20;
            fg[o + 7] = f21;
            fg[o + 8] = f22;
            // F⁻ᵀ = cof(F) / J
            hg[o] = c00 * ij;
            hg[o + 1] = c01 * ij;
            hg[o + 2] = c02 * ij;
            hg[o + 3] = (f02 * f21 - f01 * f22) * ij;
            hg[o + 4] = (f00 * f22 - f02 * f20) * ij;
            hg[o + 5] = (f01 * f20 - f00 * f21) * ij;
            hg[o + 6] = (f01 * f12 - f02 * f11) * ij;
            hg[o + 7] = (f02 * f10 - f00 * f12) * ij;
            hg[o + 8] = (f00 * f11 - f01 * f10) * ij;
            jg[g] = j;
            double w = wts[8 * e + g];
            double i1 = f00 * f00 + f01 * f01 + f02 * f02 + f10 * f10 + f11 * f11 + f12 * f12
                    + f20 * f20 + f21 * f21 + f22 * f22;
            double cr = Math.cbrt(j);
            double jm23 = 1 / (cr * cr);   // J^(−2/3)
            cg[g] = mu * jm23;
            i1g[g] = i1;
            energy += w * 0.5 * mu * (jm23 * i1 - 3);
            if (!md) {
                energy += w * volumetricEnergy(kappa, j);
            }
            vol += w;
            vcur += w * j;
        }
        minDetF = minJ;
        double theta = vcur / vol;
        if (md) {
            if (!(theta > 0)) {
                return Double.POSITIVE_INFINITY;
            }
            energy += vol * volumetricEnergy(kappa, theta);
        }
        if (fe == null && ke == null) {
            return energy;
        }
        double pTheta = 0.5 * kappa * (theta - 1 / theta);
        double uppTheta = 0.5 * kappa * (1 + 1 / (theta * theta));
        if (fe != null) {
            java.util.Arrays.fill(fe, 0);
        }
        if (ke != null) {
            java.util.Arrays.fill(ke, 0);
            java.util.Arrays.fill(d, 0);
        }
        for (int g = 0; g < 8; g++) {
            int gb = 192 * e + 24 * g;
            int o = 9 * g;
            double w = wts[8 * e + g];
            double j = jg[g];
            double f00 = fg[o], f01 = fg[o + 1], f02 = fg[o + 2];
            double f10 = fg[o + 3], f11 = fg[o + 4], f12 = fg[o + 5];
            double f20 = fg[o + 6], f21 = fg[o + 7], f22 = fg[o + 8];
            double h00 = hg[o], h01 = hg[o + 1], h02 = hg[o + 2];
            double h10 = hg[o + 3], h11 = hg[o + 4], h12 = hg[o + 5];
            double h20 = hg[o + 6], h21 = hg[o + 7], h22 = hg[o + 8];
            double i1 = i1g[g];
            double c = cg[g];
            // pressure-like coefficient of J F⁻ᵀ in P: U'(J) (Q1) or U'(θ) (mean dilatation)
            double up = md ? pTheta : 0.5 * kappa * (j - 1 / j);
            for (int a = 0; a < 8; a++) {
                double n0 = grad[gb + 3 * a];
                double n1 = grad[gb + 3 * a + 1];
                double n2 = grad[gb + 3 * a + 2];
                fa[3 * a] = f00 * n0 + f01 * n1 + f02 * n2;
                fa[3 * a + 1] = f10 * n0 + f11 * n1 + f12 * n2;
                fa[3 * a + 2] = f20 * n0 + f21 * n1 + f22 * n2;
                ga[3 * a] = h00 * n0 + h01 * n1 + h02 * n2;
                ga[3 * a + 1] = h10 * n0 + h11 * n1 + h12 * n2;
                ga[3 * a + 2] = h20 * n0 + h21 * n1 + h22 * n2;
            }
            if (fe != null) {
                // f_a = w P n_a = w [c (F n_a − (I₁/3) g_a) + U' J g_a]
                double s = up * j - c * i1 / 3;
                for (int k = 0; k < 24; k++) {
                    fe[k] += w * (c * fa[k] + s * ga[k]);
                }
            }
            if (ke == null) {
                continue;
            }
            double wc = w * c;
            double alpha;
            double beta;
            if (md) {
                alpha = w * up * j;
                beta = alpha;
                for (int k = 0; k < 24; k++) {
                    d[k] += w * j * ga[k];
                }
            } else {
                double upp = 0.5 * kappa * (1 + 1 / (j * j));
                alpha = w * j * (up + j * upp);
                beta = w * j * up;
            }
            double tt = -2.0 / 3.0 * wc;
            double gg = 2.0 / 9.0 * i1 * wc + alpha;
            double gt = i1 / 3.0 * wc - beta;
            // K_ik = nn δ_ik + f_ai (tt g_bk) + g_ai (tt f_bk + gg g_bk) + gt g_bi g_ak, with the
            // b-factors formed once per node b
            for (int b = 0; b < 8; b++) {
                int q = 3 * b;
                vb[q] = tt * fa[q] + gg * ga[q];
                vb[q + 1] = tt * fa[q + 1] + gg * ga[q + 1];
                vb[q + 2] = tt * fa[q + 2] + gg * ga[q + 2];
                wb[q] = tt * ga[q];
                wb[q + 1] = tt * ga[q + 1];
                wb[q + 2] = tt * ga[q + 2];
            }
            for (int a = 0; a < 8; a++) {
                double na0 = grad[gb + 3 * a];
                double na1 = grad[gb + 3 * a + 1];
                double na2 = grad[gb + 3 * a + 2];
                double fa0 = fa[3 * a], fa1 = fa[3 * a + 1], fa2 = fa[3 * a + 2];
                double ga0 = ga[3 * a], ga1 = ga[3 * a + 1], ga2 = ga[3 * a + 2];
                double ta0 = gt * ga0, ta1 = gt * ga1, ta2 = gt * ga2;
                for (int b = a; b < 8; b++) {
                    double nn = wc * (na0 * grad[gb + 3 * b] + na1 * grad[gb + 3 * b + 1] + na2 * grad[gb + 3 * b + 2]);
                    double wb0 = wb[3 * b], wb1 = wb[3 * b + 1], wb2 = wb[3 * b + 2];
                    double vb0 = vb[3 * b], vb1 = vb[3 * b + 1], vb2 = vb[3 * b + 2];
                    double gb0 = ga[3 * b], gb1 = ga[3 * b + 1], gb2 = ga[3 * b + 2];
                    int r0 = 24 * (3 * a) + 3 * b;
                    int r1 = r0 + 24;
                    int r2 = r1 + 24;
                    ke[r0] += nn + fa0 * wb0 + ga0 * vb0 + gb0 * ta0;
                    ke[r0 + 1] += fa0 * wb1 + ga0 * vb1 + gb0 * ta1;
                    ke[r0 + 2] += fa0 * wb2 + ga0 * vb2 + gb0 * ta2;
                    ke[r1] += fa1 * wb0 + ga1 * vb0 + gb1 * ta0;
                    ke[r1 + 1] += nn + fa1 * wb1 + ga1 * vb1 + gb1 * ta1;
                    ke[r1 + 2] += fa1 * wb2 + ga1 * vb2 + gb1 * ta2;
                    ke[r2] += fa2 * wb0 + ga2 * vb0 + gb2 * ta0;
                    ke[r2 + 1] += fa2 * wb1 + ga2 * vb1 + gb2 * ta1;
                    ke[r2 + 2] += nn + fa2 * wb2 + ga2 * vb2 + gb2 * ta2;
                }
            }
        }
        if (ke == null) {
            return energy;
        }
        if (md) {
            double s = uppTheta / vol;
            for (int a = 0; a < 8; a++) {
                for (int b = a; b < 8; b++) {
                    for (int i = 0; i < 3; i++) {
                        int row = 24 * (3 * a + i) + 3 * b;
                        double di = s * d[3 * a + i];
                        ke[row] += di * d[3 * b];
                        ke[row + 1] += di * d[3 * b + 1];
                        ke[row + 2] += di * d[3 * b + 2];
                    }
                }
            }
        }
        // mirror the upper block triangle: K(b,a) = K(a,b)ᵀ
        for (int a = 0; a < 8; a++) {
            for (int b = a + 1; b < 8; b++) {
                for (int i = 0; i < 3; i++) {
                    for (int k = 0; k < 3; k++) {
                        ke[24 * (3 * b + k) + 3 * a + i] = ke[24 * (3 * a + i) + 3 * b + k];
                    }
                }
            }
        }
        return energy;
    }

    /** U(J) = (κ/4)(J² − 1 − 2 ln J), kPa. */
    static double volumetricEnergy(double kappa, double j) {
        return 0.25 * kappa * (j * j - 1 - 2 * Math.log(j));
    }

    private static double[] centreShapeDerivatives() {
        double[] dxi = new double[24];
        for (int a = 0; a < 8; a++) {
            dxi[3 * a] = 0.125 * ReferenceGeometry.NODE_XI[a];
            dxi[3 * a + 1] = 0.125 * ReferenceGeometry.NODE_ETA[a];
            dxi[3 * a + 2] = 0.125 * ReferenceGeometry.NODE_ZETA[a];
        }
        return dxi;
    }

    /**
     * Deformation gradient at the element centre (ξ = 0) from reference node coordinates and nodal
     * displacements: F = (∂x/∂ξ)(∂X/∂ξ)⁻¹ with x = X + u. Allocates three 3×3 workspaces; loops over
     * many elements should pass their own (the six-argument form).
     *
     * @param xe reference coordinates of the 8 nodes (24 values, mm), not modified
     * @param ue displacements of the 8 nodes (24 values, mm), not modified
     * @param f  out: F row-major (9 values); must not alias the inputs
     * @return det F
     */
    public static double centreDeformationGradient(double[] xe, double[] ue, double[] f) {
        return centreDeformationGradient(xe, ue, f, new double[9], new double[9], new double[9]);
    }

    /**
     * As {@link #centreDeformationGradient(double[], double[], double[])} with the caller's 3×3
     * workspaces (9 values each, overwritten, distinct), so a loop over elements allocates nothing.
     *
     * @param j0  work: ∂X/∂ξ
     * @param jx  work: ∂x/∂ξ
     * @param inv work: (∂X/∂ξ)⁻¹
     */
    public static double centreDeformationGradient(double[] xe, double[] ue, double[] f, double[] j0, double[] jx,
                                                   double[] inv) {
        double[] dxi = CENTRE_DN_DXI;
        java.util.Arrays.fill(j0, 0);
        java.util.Arrays.fill(jx, 0);
        for (int a = 0; a < 8; a++) {
            for (int i = 0; i < 3; i++) {
                for (int al = 0; al < 3; al++) {
                    j0[3 * i + al] += xe[3 * a + i] * dxi[3 * a + al];
                    jx[3 * i + al] += (xe[3 * a + i] + ue[3 * a + i]) * dxi[3 * a + al];
                }
            }
        }
        double det0 = Mat3.inverse(j0, inv);
        if (!(det0 > 0)) {
            throw new InvertedElementException(-1, det0, "reference element is degenerate");
        }
        Mat3.multiply(jx, inv, f);
        return Mat3.det(f);
    }
}
