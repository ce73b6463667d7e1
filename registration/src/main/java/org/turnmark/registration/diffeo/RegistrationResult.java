package org.turnmark.registration.diffeo;

import java.util.List;

import org.turnmark.geom.Affine3D;
import org.turnmark.registration.metric.MetricKind;
import org.turnmark.registration.transform.JacobianStats;
import org.turnmark.registration.volume.VectorField;

/**
 * Outcome of {@link DiffeomorphicRegistration#register}.
 *
 * <p>Convention: {@code displacement} u lives on the fixed grid and {@code x + u(x)} is the point of
 * the moving image (RAS mm) that corresponds to the fixed-image point x. It is the total map
 * {@code A ∘ φ₀ ∘ exp(v)}: first the residual {@code exp(velocity)}, then the initial field φ₀ (if
 * given), then the pre-alignment affine A (if any).
 *
 * @param velocity        stationary velocity field v on the fixed grid (mm); zero if not improved
 * @param displacement    total displacement u on the fixed grid (mm)
 * @param preAlignment    the affine A (fixed world → moving world), identity if none
 * @param metric          the similarity measure used
 * @param costInitial     cost of the starting map (A ∘ φ₀) at the finest level (lower is better)
 * @param costFinal       cost of the returned map at the finest level
 * @param improved        false when no level could lower the cost below the starting map's; the
 *                        returned map is then the starting map and v = 0
 * @param levels          per-level diagnostics, coarsest first
 * @param jacobian        Jacobian determinant statistics of the total map inside the fixed mask
 * @param residualJacobian Jacobian statistics of the residual exp(v) alone inside the fixed mask
 * @param seconds         wall time (s)
 */
public record RegistrationResult(VectorField velocity, VectorField displacement, Affine3D preAlignment,
                                 MetricKind metric, double costInitial, double costFinal, boolean improved,
                                 List<LevelReport> levels, JacobianStats jacobian, JacobianStats residualJacobian,
                                 double seconds) {

    public RegistrationResult {
        levels = List.copyOf(levels);
    }

    /** Total accepted iterations over all levels. */
    public int totalIterations() {
        int s = 0;
        for (LevelReport r : levels) {
            s += r.iterations();
        }
        return s;
    }
}
