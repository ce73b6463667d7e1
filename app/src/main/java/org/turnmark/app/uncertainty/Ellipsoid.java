package org.turnmark.app.uncertainty;

import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.EigenDecomposition_F64;

/**
 * The confidence ellipsoid of a 3-D Gaussian N(μ, Σ) at probability p: the region
 * {@code (x − μ)ᵀ Σ⁻¹ (x − μ) ≤ χ²₃(p)}. With Σ = V Λ Vᵀ, semi-axis i lies along column vᵢ with
 * length {@code √(χ²₃(p) λᵢ)} (REFERENCE §4).
 *
 * <p>Axes are sorted longest first; directions are unit vectors in RAS with a sign fixed so that the
 * largest component is positive (eigenvectors have no intrinsic sign). Lengths in mm when Σ is in mm².
 * Immutable and thread safe.
 */
public final class Ellipsoid {

    /** Relative eigenvalue below which a direction counts as degenerate (zero variance). */
    public static final double DEGENERATE_RELATIVE = 1e-12;

    private final double[] centerRasMm;
    private final double[] covariance;
    private final double probability;
    private final double chiSquare;
    private final double[] eigenvalues;
    private final double[] axes;
    private final double[] semiAxesMm;

    private Ellipsoid(double[] center, double[] cov, double p, double chi2, double[] lambda, double[] axes) {
        this.centerRasMm = center;
        this.covariance = cov;
        this.probability = p;
        this.chiSquare = chi2;
        this.eigenvalues = lambda;
        this.axes = axes;
        this.semiAxesMm = new double[3];
        for (int i = 0; i < 3; i++) {
            semiAxesMm[i] = Math.sqrt(chi2 * Math.max(0, lambda[i]));
        }
    }

    /**
     * The χ²₃ quantile for probability p (Commons Math {@link ChiSquaredDistribution}).
     *
     * @param p probability in (0, 1)
     */
    public static double chiSquare3(double p) {
        if (!(p > 0 && p < 1)) {
            throw new IllegalArgumentException("probability must be in (0, 1), got " + p);
        }
        return new ChiSquaredDistribution(null, 3).inverseCumulativeProbability(p);
    }

    /**
     * Builds the ellipsoid.
     *
     * @param centerRasMm μ, length 3 (copied)
     * @param covariance  Σ, 3×3 row-major (9 values, copied); must be symmetric positive semi-definite
     * @param probability p in (0, 1)
     * @throws IllegalArgumentException for non-finite, asymmetric or indefinite Σ
     */
    public static Ellipsoid of(double[] centerRasMm, double[] covariance, double probability) {
        if (centerRasMm.length != 3 || covariance.length != 9) {
            throw new IllegalArgumentException("need a 3-vector and a 3x3 covariance, got lengths "
                    + centerRasMm.length + " and " + covariance.length);
        }
        double scale = 0;
        for (double v : covariance) {
            if (!Double.isFinite(v)) {
                throw new IllegalArgumentException("covariance must be finite, got " + v);
            }
            scale = Math.max(scale, Math.abs(v));
        }
        for (int r = 0; r < 3; r++) {
            for (int c = r + 1; c < 3; c++) {
                if (Math.abs(covariance[3 * r + c] - covariance[3 * c + r]) > 1e-9 * Math.max(scale, 1e-300)) {
                    throw new IllegalArgumentException("covariance must be symmetric, entry (" + r + "," + c + ") = "
                            + covariance[3 * r + c] + " vs (" + c + "," + r + ") = " + covariance[3 * c + r]);
                }
            }
        }
        double chi2 = chiSquare3(probability);
        double[] lambda = new double[3];
        double[] v = new double[9];
        if (scale == 0) {
            v[0] = 1;
            v[4] = 1;
            v[8] = 1;
        } else {
            EigenDecomposition_F64<DMatrixRMaj> eig = DecompositionFactory_DDRM.eig(3, true, true);
            if (!eig.decompose(new DMatrixRMaj(3, 3, true, covariance))) {
                throw new IllegalArgumentException("eigen-decomposition of the covariance failed");
            }
            int[] order = {0, 1, 2};
            double[] l = new double[3];
            for (int i = 0; i < 3; i++) {
                l[i] = eig.getEigenvalue(i).getReal();
            }
            // Sort indices by eigenvalue, largest first (three elements: insertion sort).
            for (int a = 1; a < 3; a++) {
                for (int b = a; b > 0 && l[order[b]] > l[order[b - 1]]; b--) {
                    int t = order[b];
                    order[b] = order[b - 1];
                    order[b - 1] = t;
                }
            }
            for (int i = 0; i < 3; i++) {
                double li = l[order[i]];
                if (li < -1e-9 * scale) {
                    throw new IllegalArgumentException("covariance must be positive semi-definite, eigenvalue " + li);
                }
                lambda[i] = Math.max(0, li);
                DMatrixRMaj vec = eig.getEigenVector(order[i]);
                double n = Math.sqrt(vec.get(0) * vec.get(0) + vec.get(1) * vec.get(1) + vec.get(2) * vec.get(2));
                int big = 0;
                for (int c = 1; c < 3; c++) {
                    if (Math.abs(vec.get(c)) > Math.abs(vec.get(big))) {
                        big = c;
                    }
                }
                double sign = vec.get(big) < 0 ? -1 : 1;
                for (int c = 0; c < 3; c++) {
                    v[3 * i + c] = sign * vec.get(c) / n;
                }
            }
        }
        return new Ellipsoid(centerRasMm.clone(), covariance.clone(), probability, chi2, lambda, v);
    }

    public double[] centerRasMm() {
        return centerRasMm.clone();
    }

    /** Σ, 3×3 row-major (a copy). */
    public double[] covariance() {
        return covariance.clone();
    }

    public double probability() {
        return probability;
    }

    /** χ²₃(p). */
    public double chiSquare() {
        return chiSquare;
    }

    /** Eigenvalues of Σ, largest first (mm²). */
    public double[] eigenvalues() {
        return eigenvalues.clone();
    }

    /** Semi-axis lengths, longest first (mm). */
    public double[] semiAxesMm() {
        return semiAxesMm.clone();
    }

    /** Unit direction of semi-axis {@code i} (RAS), a new array of 3. */
    public double[] axis(int i) {
        return new double[] {axes[3 * i], axes[3 * i + 1], axes[3 * i + 2]};
    }

    /**
     * Squared Mahalanobis distance of a point from the centre, Σ_i (vᵢ·(x − μ))² / λᵢ; infinite when
     * the point leaves the centre along a degenerate (zero-variance) direction.
     */
    public double mahalanobisSquared(double[] pointRasMm) {
        double d0 = pointRasMm[0] - centerRasMm[0];
        double d1 = pointRasMm[1] - centerRasMm[1];
        double d2 = pointRasMm[2] - centerRasMm[2];
        double tiny = DEGENERATE_RELATIVE * Math.max(eigenvalues[0], Double.MIN_NORMAL);
        double sum = 0;
        for (int i = 0; i < 3; i++) {
            double proj = axes[3 * i] * d0 + axes[3 * i + 1] * d1 + axes[3 * i + 2] * d2;
            if (eigenvalues[i] <= tiny) {
                if (Math.abs(proj) > 1e-9) {
                    return Double.POSITIVE_INFINITY;
                }
            } else {
                sum += proj * proj / eigenvalues[i];
            }
        }
        return sum;
    }

    /** True if the point lies inside or on the ellipsoid. */
    public boolean contains(double[] pointRasMm) {
        return mahalanobisSquared(pointRasMm) <= chiSquare;
    }

    /** Volume (mm³), 4/3 π a b c. */
    public double volumeMm3() {
        return 4.0 / 3.0 * Math.PI * semiAxesMm[0] * semiAxesMm[1] * semiAxesMm[2];
    }
}
