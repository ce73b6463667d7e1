package org.turnmark.registration.diffeo;

import org.apache.commons.math3.analysis.MultivariateFunction;
import org.apache.commons.math3.exception.TooManyEvaluationsException;
import org.apache.commons.math3.optim.InitialGuess;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.PointValuePair;
import org.apache.commons.math3.optim.SimpleBounds;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.nonlinear.scalar.ObjectiveFunction;
import org.apache.commons.math3.optim.nonlinear.scalar.noderiv.BOBYQAOptimizer;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;

/**
 * Global (translation, rigid or affine) alignment before the deformable stage: start from the
 * centres of intensity mass (first moments) of the two images, then minimise the similarity cost at a
 * coarse level over the parameters with Powell's BOBYQA (derivative-free, bounded; Commons Math).
 *
 * <p>Parameterisation about the fixed centre c: {@code y = c + t₀ + t + R(r)·S(s)·(x − c)}, with
 * t in mm (bounded ±{@link #MAX_TRANSLATION_MM}), r a rotation vector (rad, ±{@link #MAX_ROTATION_RAD}),
 * S = exp(diag(s₀..s₂)) plus shears s₃..s₅ (±{@link #MAX_SCALE_LOG}). The optimiser works on scaled
 * parameters (10 mm, 0.1 rad, 0.05) so that all are of order one.
 */
final class PreAligner {

    static final double MAX_TRANSLATION_MM = 60;
    static final double MAX_ROTATION_RAD = 0.5;
    static final double MAX_SCALE_LOG = 0.3;
    /** Budget of cost evaluations (each one warps the coarse level once). */
    static final int MAX_EVALUATIONS = 1500;
    /** Cost given to parameters under which the images stop overlapping. */
    static final double NO_OVERLAP_PENALTY = 1e30;

    private static final double T_UNIT = 10;
    private static final double R_UNIT = 0.1;
    private static final double S_UNIT = 0.05;

    private PreAligner() {
    }

    /**
     * Finds A (fixed world → moving world, applied after φ₀).
     *
     * @param solver        coarse-level solver (its velocity is zero; only its cost is used)
     * @param fixedCentre   centre of mass of the fixed image (RAS mm)
     * @param startShift    initial translation t₀ (mm), e.g. the difference of the centres of mass
     * @param kind          which parameters are free
     * @return the best affine found; identity-like starting guess if nothing was better
     */
    static Affine3D align(LevelSolver solver, Grid3 grid, double[] fixedCentre, double[] startShift, PreAlignment kind) {
        int np = kind == PreAlignment.TRANSLATION ? 3 : kind == PreAlignment.RIGID ? 6 : 12;
        VectorField zero = VectorField.zeros(grid);
        MultivariateFunction f = p -> {
            solver.setAffine(build(p, fixedCentre, startShift));
            try {
                return solver.evaluate(zero);
            } catch (IllegalArgumentException e) {
                return NO_OVERLAP_PENALTY;
            }
        };
        double[] lower = new double[np];
        double[] upper = new double[np];
        for (int q = 0; q < np; q++) {
            double b = q < 3 ? MAX_TRANSLATION_MM / T_UNIT : q < 6 ? MAX_ROTATION_RAD / R_UNIT : MAX_SCALE_LOG / S_UNIT;
            lower[q] = -b;
            upper[q] = b;
        }
        double[] start = new double[np];
        double startCost = f.value(start);
        double[] best = start;
        double bestCost = startCost;
        if (np >= 2) {
            try {
                BOBYQAOptimizer opt = new BOBYQAOptimizer(2 * np + 1, 1.0, 1e-3);
                PointValuePair r = opt.optimize(new MaxEval(MAX_EVALUATIONS), new ObjectiveFunction(f),
                        GoalType.MINIMIZE, new InitialGuess(start), new SimpleBounds(lower, upper));
                if (r.getValue() < bestCost) {
                    best = r.getPoint();
                    bestCost = r.getValue();
                }
            } catch (TooManyEvaluationsException e) {
                // Keep the best point seen so far (the start); the deformable stage continues from it.
                best = start;
            }
        }
        Affine3D a = build(best, fixedCentre, startShift);
        solver.setAffine(a);
        return a;
    }

    /** The affine for scaled parameters p (length 3, 6 or 12). */
    static Affine3D build(double[] p, double[] c, double[] t0) {
        double tx = p[0] * T_UNIT + t0[0];
        double ty = p[1] * T_UNIT + t0[1];
        double tz = p[2] * T_UNIT + t0[2];
        Affine3D lin = Affine3D.identity();
        if (p.length >= 6) {
            double rx = p[3] * R_UNIT;
            double ry = p[4] * R_UNIT;
            double rz = p[5] * R_UNIT;
            double angle = Math.sqrt(rx * rx + ry * ry + rz * rz);
            if (angle > 0) {
                lin = Affine3D.rotation(rx, ry, rz, angle);
            }
        }
        if (p.length >= 12) {
            double sx = Math.exp(p[6] * S_UNIT);
            double sy = Math.exp(p[7] * S_UNIT);
            double sz = Math.exp(p[8] * S_UNIT);
            Affine3D s = new Affine3D(sx, p[9] * S_UNIT, p[10] * S_UNIT, 0, 0, sy, p[11] * S_UNIT, 0, 0, 0, sz, 0);
            lin = lin.compose(s);
        }
        Affine3D toCentre = Affine3D.translation(-c[0], -c[1], -c[2]);
        Affine3D back = Affine3D.translation(c[0] + tx, c[1] + ty, c[2] + tz);
        return back.compose(lin).compose(toCentre);
    }
}
