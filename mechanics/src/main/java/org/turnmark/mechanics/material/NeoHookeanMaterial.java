package org.turnmark.mechanics.material;

/**
 * A compressible neo-Hookean solid with a decoupled volumetric part.
 *
 * <p>Strain energy per unit reference volume (kPa = mN/mm² = mN·mm/mm³):
 * <pre>
 *   ψ(F) = (μ/2)(J^(−2/3) I₁ − 3) + (κ/4)(J² − 1 − 2 ln J),   I₁ = tr(FᵀF),  J = det F
 * </pre>
 * the isochoric neo-Hookean term with the volumetric function U(J) = (κ/4)(J² − 1 − 2 ln J)
 * (the Cook's-membrane benchmark law; Pelteret &amp; McBride 2016), so U(1) = U'(1) = 0 and
 * U''(1) = κ: at small strain μ is the shear modulus and κ the bulk modulus, linked to Poisson's
 * ratio by κ = 2μ(1+ν)/(3(1−2ν)) (linear elasticity, common practice).
 *
 * <p>Units: μ and κ in kPa, density in kg/m³. With lengths in mm and forces in mN, a body force
 * ρg (g in m/s²) is ρ·g·1e−6 mN/mm³ per unit reference volume. Immutable and thread safe.
 */
public final class NeoHookeanMaterial {

    private final double muKpa;
    private final double kappaKpa;
    private final double densityKgM3;

    private NeoHookeanMaterial(double muKpa, double kappaKpa, double densityKgM3) {
        this.muKpa = muKpa;
        this.kappaKpa = kappaKpa;
        this.densityKgM3 = densityKgM3;
    }

    /**
     * Material from shear modulus and Poisson's ratio.
     *
     * @param muKpa       small-strain shear modulus μ, kPa, &gt; 0
     * @param nu          small-strain Poisson's ratio, in (−1, 0.5)
     * @param densityKgM3 mass density, kg/m³, &gt; 0
     * @throws IllegalArgumentException naming the parameter, expected range and actual value
     */
    public static NeoHookeanMaterial ofMuNu(double muKpa, double nu, double densityKgM3) {
        checkMu(muKpa);
        if (!(nu > -1 && nu < 0.5)) {
            throw new IllegalArgumentException("Poisson's ratio nu must be in (-1, 0.5), got " + nu);
        }
        checkDensity(densityKgM3);
        return new NeoHookeanMaterial(muKpa, kappaFromMuNu(muKpa, nu), densityKgM3);
    }

    /**
     * Material from shear and bulk moduli.
     *
     * @param muKpa       shear modulus μ, kPa, &gt; 0
     * @param kappaKpa    bulk modulus κ, kPa, &gt; 0 (κ &gt; 2μ/3 for a positive Poisson's ratio)
     * @param densityKgM3 mass density, kg/m³, &gt; 0
     */
    public static NeoHookeanMaterial ofMuKappa(double muKpa, double kappaKpa, double densityKgM3) {
        checkMu(muKpa);
        if (!(kappaKpa > 0) || !Double.isFinite(kappaKpa)) {
            throw new IllegalArgumentException("bulk modulus kappa must be a finite value > 0 kPa, got " + kappaKpa);
        }
        checkDensity(densityKgM3);
        return new NeoHookeanMaterial(muKpa, kappaKpa, densityKgM3);
    }

    /** κ = 2μ(1+ν)/(3(1−2ν)) (linear elasticity). */
    public static double kappaFromMuNu(double muKpa, double nu) {
        return 2 * muKpa * (1 + nu) / (3 * (1 - 2 * nu));
    }

    private static void checkMu(double muKpa) {
        if (!(muKpa > 0) || !Double.isFinite(muKpa)) {
            throw new IllegalArgumentException("shear modulus mu must be a finite value > 0 kPa, got " + muKpa);
        }
    }

    private static void checkDensity(double densityKgM3) {
        if (!(densityKgM3 > 0) || !Double.isFinite(densityKgM3)) {
            throw new IllegalArgumentException("density must be a finite value > 0 kg/m3, got " + densityKgM3);
        }
    }

    /** Shear modulus μ, kPa. */
    public double muKpa() {
        return muKpa;
    }

    /** Bulk modulus κ, kPa. */
    public double kappaKpa() {
        return kappaKpa;
    }

    /** Small-strain Poisson's ratio ν = (3κ − 2μ)/(2(3κ + μ)). */
    public double nu() {
        return (3 * kappaKpa - 2 * muKpa) / (2 * (3 * kappaKpa + muKpa));
    }

    /** Small-strain Young's modulus E = 9κμ/(3κ + μ), kPa. */
    public double youngKpa() {
        return 9 * kappaKpa * muKpa / (3 * kappaKpa + muKpa);
    }

    /** Mass density, kg/m³. */
    public double densityKgM3() {
        return densityKgM3;
    }

    /** The same elastic constants with another density. */
    public NeoHookeanMaterial withDensity(double newDensityKgM3) {
        checkDensity(newDensityKgM3);
        return new NeoHookeanMaterial(muKpa, kappaKpa, newDensityKgM3);
    }

    /** Strain energy ψ(F) per unit reference volume, kPa; F row-major 3×3; +∞ if det F ≤ 0. */
    public double energy(double[] f) {
        double j = f[0] * (f[4] * f[8] - f[5] * f[7]) - f[1] * (f[3] * f[8] - f[5] * f[6])
                + f[2] * (f[3] * f[7] - f[4] * f[6]);
        if (!(j > 0)) {
            return Double.POSITIVE_INFINITY;
        }
        double i1 = 0;
        for (int k = 0; k < 9; k++) {
            i1 += f[k] * f[k];
        }
        return 0.5 * muKpa * (Math.pow(j, -2.0 / 3.0) * i1 - 3) + 0.25 * kappaKpa * (j * j - 1 - 2 * Math.log(j));
    }

    /**
     * Cauchy stress σ = J⁻¹ P Fᵀ = μ J^(−5/3) dev(b) + U'(J) I, kPa, for deformation gradient
     * {@code f} (row-major 3×3, det F &gt; 0). Writes the symmetric tensor row-major into
     * {@code sigma} (length 9); {@code sigma} must not alias {@code f}.
     */
    public void cauchyStress(double[] f, double[] sigma) {
        double j = f[0] * (f[4] * f[8] - f[5] * f[7]) - f[1] * (f[3] * f[8] - f[5] * f[6])
                + f[2] * (f[3] * f[7] - f[4] * f[6]);
        if (!(j > 0)) {
            throw new IllegalArgumentException("deformation gradient must have det F > 0, got " + j);
        }
        for (int r = 0; r < 3; r++) {
            for (int c = 0; c < 3; c++) {
                sigma[3 * r + c] = f[3 * r] * f[3 * c] + f[3 * r + 1] * f[3 * c + 1] + f[3 * r + 2] * f[3 * c + 2];
            }
        }
        double tr3 = (sigma[0] + sigma[4] + sigma[8]) / 3;
        double c = muKpa * Math.pow(j, -5.0 / 3.0);
        double p = 0.5 * kappaKpa * (j - 1 / j);
        for (int k = 0; k < 9; k++) {
            sigma[k] *= c;
        }
        sigma[0] += p - c * tr3;
        sigma[4] += p - c * tr3;
        sigma[8] += p - c * tr3;
    }

    @Override
    public String toString() {
        return String.format("neo-Hookean mu=%.6g kPa kappa=%.6g kPa (nu=%.4f) density=%.6g kg/m3",
                muKpa, kappaKpa, nu(), densityKgM3);
    }
}
