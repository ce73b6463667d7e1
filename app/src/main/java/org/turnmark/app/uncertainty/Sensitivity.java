package org.turnmark.app.uncertainty;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;

import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.factory.LinearSolverFactory_DDRM;
import org.ejml.interfaces.linsol.LinearSolverDense;

/**
 * Per-parameter sensitivity of a predicted 3-D position, from the prior samples already computed
 * for the covariance (no extra solves): a linear regression of each position component on the
 * standardised inputs, {@code x_c ≈ a_c + Σ_j b_jc s_j}.
 *
 * <p>The effect of parameter j is {@code ‖b_j‖ · sd(s_j)} in mm: how far the position moves, in 3-D,
 * for a one-standard-deviation change of that input (standardised regression coefficients; Saltelli
 * et al., Global Sensitivity Analysis, 2008, §1.2.5). One-at-a-time perturbations would need two extra
 * finite-element solves per parameter; the regression reuses the sampling solves and also accounts for
 * the other parameters varying at the same time. With fewer samples than parameters + 2 the
 * multivariate fit is under-determined, and each parameter is regressed alone instead (Sobol and Latin
 * hypercube designs have nearly uncorrelated columns, so the two agree for a linear response).
 * The fraction of the position variance the linear fit explains (R²) is reported beside it.
 */
public final class Sensitivity {

    /**
     * One parameter's effect.
     *
     * @param parameter name
     * @param effectMm  3-D displacement of the prediction per one standard deviation of the input (mm)
     * @param perAxisMm signed effect along R, A, S (mm per SD)
     */
    public record Effect(String parameter, double effectMm, double[] perAxisMm) {
    }

    /**
     * Result: effects sorted largest first, the method used and the fraction of the position variance
     * the multivariate linear fit explains (R²; null when that fit was not possible).
     */
    public record Ranking(List<Effect> effects, String method, Double explainedVariance) {
    }

    private Sensitivity() {
    }

    /**
     * Ranks the parameters.
     *
     * @param names     parameter names, length p
     * @param scores    standardised inputs, {@code scores[n][j]} for sample n (not modified)
     * @param positions outputs, {@code positions[n]} of length 3 (mm)
     */
    public static Ranking rank(String[] names, double[][] scores, double[][] positions) {
        int n = scores.length;
        int p = names.length;
        if (positions.length != n || n < 2) {
            throw new IllegalArgumentException("need matching inputs and outputs for >= 2 samples, got "
                    + n + " and " + positions.length);
        }
        double[] sd = new double[p];
        double[] mean = new double[p];
        for (int j = 0; j < p; j++) {
            for (int i = 0; i < n; i++) {
                mean[j] += scores[i][j] / n;
            }
            for (int i = 0; i < n; i++) {
                sd[j] += (scores[i][j] - mean[j]) * (scores[i][j] - mean[j]) / (n - 1);
            }
            sd[j] = Math.sqrt(sd[j]);
        }
        double[] ymean = new double[3];
        double ssTot = 0;
        for (int i = 0; i < n; i++) {
            for (int c = 0; c < 3; c++) {
                ymean[c] += positions[i][c] / n;
            }
        }
        for (int i = 0; i < n; i++) {
            for (int c = 0; c < 3; c++) {
                ssTot += (positions[i][c] - ymean[c]) * (positions[i][c] - ymean[c]);
            }
        }
        // Columns with no spread (e.g. a chest-wall probability of 0 or 1) carry no information.
        List<Integer> active = new ArrayList<>();
        for (int j = 0; j < p; j++) {
            if (sd[j] > 1e-12) {
                active.add(j);
            }
        }
        double[][] b = new double[p][3];
        String method;
        double ssRes = 0;
        if (n >= active.size() + 2 && !active.isEmpty()) {
            method = "multiple linear regression on standardised inputs";
            int q = active.size();
            DMatrixRMaj x = new DMatrixRMaj(n, q + 1);
            DMatrixRMaj y = new DMatrixRMaj(n, 3);
            for (int i = 0; i < n; i++) {
                x.set(i, 0, 1);
                for (int a = 0; a < q; a++) {
                    int j = active.get(a);
                    x.set(i, a + 1, (scores[i][j] - mean[j]) / sd[j]);
                }
                for (int c = 0; c < 3; c++) {
                    y.set(i, c, positions[i][c]);
                }
            }
            LinearSolverDense<DMatrixRMaj> solver = LinearSolverFactory_DDRM.leastSquaresQrPivot(true, false);
            if (!solver.setA(x)) {
                throw new IllegalArgumentException("sensitivity regression is singular");
            }
            DMatrixRMaj coef = new DMatrixRMaj(q + 1, 3);
            solver.solve(y, coef);
            DMatrixRMaj fit = new DMatrixRMaj(n, 3);
            CommonOps_DDRM.mult(x, coef, fit);
            for (int i = 0; i < n; i++) {
                for (int c = 0; c < 3; c++) {
                    double r = y.get(i, c) - fit.get(i, c);
                    ssRes += r * r;
                }
            }
            for (int a = 0; a < q; a++) {
                for (int c = 0; c < 3; c++) {
                    b[active.get(a)][c] = coef.get(a + 1, c);
                }
            }
        } else {
            method = "one-parameter regressions (fewer samples than parameters + 2)";
            ssRes = -1;
            for (int j : active) {
                for (int c = 0; c < 3; c++) {
                    double sxy = 0;
                    for (int i = 0; i < n; i++) {
                        sxy += (scores[i][j] - mean[j]) / sd[j] * (positions[i][c] - ymean[c]);
                    }
                    b[j][c] = sxy / (n - 1);
                }
            }
        }
        List<Effect> effects = new ArrayList<>();
        for (int j = 0; j < p; j++) {
            double e = Math.sqrt(b[j][0] * b[j][0] + b[j][1] * b[j][1] + b[j][2] * b[j][2]);
            effects.add(new Effect(names[j], e, b[j].clone()));
        }
        effects.sort(Comparator.comparingDouble(Effect::effectMm).reversed());
        Double r2 = ssTot > 0 && ssRes >= 0 ? 1 - ssRes / ssTot : null;
        return new Ranking(List.copyOf(effects), method, r2);
    }
}
