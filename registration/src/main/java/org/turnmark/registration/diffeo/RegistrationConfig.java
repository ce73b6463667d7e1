package org.turnmark.registration.diffeo;

import java.util.Arrays;

import org.turnmark.registration.metric.LnccWindow;
import org.turnmark.registration.metric.MetricKind;
import org.turnmark.registration.transform.UpdateRule;

/**
 * Settings of {@link DiffeomorphicRegistration}. Immutable and validated: every field is checked in
 * the constructor and a bad value is rejected with its name, the expected range and the actual value.
 *
 * @param metric              similarity measure
 * @param iterations          iteration budget per pyramid level, coarsest first; its length is the
 *                            number of levels (1..{@link #MAX_LEVELS}); each ≥ 0
 * @param fluidSigmaMm        Gaussian σ (mm) applied to each update field (fluid-like regularisation) at
 *                            the finest level, ≥ 0; level l, whose voxels are about 2^l times larger,
 *                            uses 2^l times that
 * @param diffusionSigmaMm    Gaussian σ (mm) applied to the velocity field after each update
 *                            (diffusion-like regularisation) at the finest level, ≥ 0; scaled like
 *                            fluidSigmaMm
 * @param fluidWeight         blend of the smoothed update, in [0, 1]: {@code (1−w)·u + w·G∗u}
 * @param diffusionWeight     blend of the smoothed velocity, in [0, 1]
 * @param maxStepMm           longest update vector at the finest level in mm (&gt; 0); level l, whose
 *                            voxels are about 2^l times larger, allows 2^l times that
 * @param updateRule          how updates are composed with the velocity field (BCH or addition)
 * @param lnccRadiusMm        LNCC window half-width in mm (&gt; 0)
 * @param lnccWindow          LNCC window weights
 * @param miBins              mutual-information histogram bins per axis (8..1024)
 * @param convergenceWindow   number of accepted iterations over which the cost decrease is measured (≥ 1)
 * @param convergenceTolerance relative cost decrease over that window below which a level stops (≥ 0)
 * @param preAlignment        optional global alignment before the deformable stage
 * @param symmetric           symmetric (inverse-consistent) variant: forward and backward forces,
 *                            update ½ (Z(v, δ_f) − Z(−v, δ_b)) (see {@link DiffeomorphicRegistration})
 */
public record RegistrationConfig(MetricKind metric, int[] iterations, double fluidSigmaMm, double diffusionSigmaMm,
                                 double fluidWeight, double diffusionWeight, double maxStepMm, UpdateRule updateRule,
                                 double lnccRadiusMm, LnccWindow lnccWindow, int miBins, int convergenceWindow,
                                 double convergenceTolerance, PreAlignment preAlignment, boolean symmetric) {

    /** Most pyramid levels accepted. */
    public static final int MAX_LEVELS = 6;

    public RegistrationConfig {
        if (metric == null || updateRule == null || lnccWindow == null || preAlignment == null) {
            throw new IllegalArgumentException("metric, updateRule, lnccWindow and preAlignment must be given");
        }
        if (iterations == null || iterations.length < 1 || iterations.length > MAX_LEVELS) {
            throw new IllegalArgumentException("iterations must list 1.." + MAX_LEVELS + " levels, got "
                    + (iterations == null ? "none" : iterations.length));
        }
        iterations = iterations.clone();
        for (int it : iterations) {
            if (it < 0) {
                throw new IllegalArgumentException("iterations per level must be >= 0, got " + Arrays.toString(iterations));
            }
        }
        nonNegative("fluidSigmaMm", fluidSigmaMm);
        nonNegative("diffusionSigmaMm", diffusionSigmaMm);
        unit("fluidWeight", fluidWeight);
        unit("diffusionWeight", diffusionWeight);
        positive("maxStepMm", maxStepMm);
        positive("lnccRadiusMm", lnccRadiusMm);
        if (miBins < 8 || miBins > 1024) {
            throw new IllegalArgumentException("miBins must be in [8, 1024], got " + miBins);
        }
        if (convergenceWindow < 1) {
            throw new IllegalArgumentException("convergenceWindow must be >= 1, got " + convergenceWindow);
        }
        nonNegative("convergenceTolerance", convergenceTolerance);
    }

    /**
     * Defaults for breast MRI at 1–2 mm: LNCC with a 4 mm box window, three levels (about 4, 2 and 1×
     * the finest spacing) with 60, 40 and 20 iterations, update σ 2 mm, velocity σ 1.5 mm, steps of
     * at most 1 mm at the finest level, BCH composition, no pre-alignment, forward forces only.
     */
    public static RegistrationConfig defaults() {
        return new RegistrationConfig(MetricKind.LNCC, new int[] {60, 40, 20}, 2.0, 1.5, 1.0, 1.0, 1.0,
                UpdateRule.BCH, 4.0, LnccWindow.BOX, 32, 5, 1e-4, PreAlignment.NONE, false);
    }

    /** Number of pyramid levels. */
    public int levels() {
        return iterations.length;
    }

    /** A copy of the per-level iteration budgets, coarsest first. */
    @Override
    public int[] iterations() {
        return iterations.clone();
    }

    public RegistrationConfig withMetric(MetricKind m) {
        return new RegistrationConfig(m, iterations, fluidSigmaMm, diffusionSigmaMm, fluidWeight, diffusionWeight,
                maxStepMm, updateRule, lnccRadiusMm, lnccWindow, miBins, convergenceWindow, convergenceTolerance,
                preAlignment, symmetric);
    }

    public RegistrationConfig withIterations(int... its) {
        return new RegistrationConfig(metric, its, fluidSigmaMm, diffusionSigmaMm, fluidWeight, diffusionWeight,
                maxStepMm, updateRule, lnccRadiusMm, lnccWindow, miBins, convergenceWindow, convergenceTolerance,
                preAlignment, symmetric);
    }

    public RegistrationConfig withSmoothing(double fluidSigma, double diffusionSigma) {
        return new RegistrationConfig(metric, iterations, fluidSigma, diffusionSigma, fluidWeight, diffusionWeight,
                maxStepMm, updateRule, lnccRadiusMm, lnccWindow, miBins, convergenceWindow, convergenceTolerance,
                preAlignment, symmetric);
    }

    public RegistrationConfig withWeights(double fluid, double diffusion) {
        return new RegistrationConfig(metric, iterations, fluidSigmaMm, diffusionSigmaMm, fluid, diffusion,
                maxStepMm, updateRule, lnccRadiusMm, lnccWindow, miBins, convergenceWindow, convergenceTolerance,
                preAlignment, symmetric);
    }

    public RegistrationConfig withMaxStepMm(double step) {
        return new RegistrationConfig(metric, iterations, fluidSigmaMm, diffusionSigmaMm, fluidWeight, diffusionWeight,
                step, updateRule, lnccRadiusMm, lnccWindow, miBins, convergenceWindow, convergenceTolerance,
                preAlignment, symmetric);
    }

    public RegistrationConfig withUpdateRule(UpdateRule rule) {
        return new RegistrationConfig(metric, iterations, fluidSigmaMm, diffusionSigmaMm, fluidWeight, diffusionWeight,
                maxStepMm, rule, lnccRadiusMm, lnccWindow, miBins, convergenceWindow, convergenceTolerance,
                preAlignment, symmetric);
    }

    public RegistrationConfig withLncc(double radiusMm, LnccWindow window) {
        return new RegistrationConfig(metric, iterations, fluidSigmaMm, diffusionSigmaMm, fluidWeight, diffusionWeight,
                maxStepMm, updateRule, radiusMm, window, miBins, convergenceWindow, convergenceTolerance,
                preAlignment, symmetric);
    }

    public RegistrationConfig withMiBins(int bins) {
        return new RegistrationConfig(metric, iterations, fluidSigmaMm, diffusionSigmaMm, fluidWeight, diffusionWeight,
                maxStepMm, updateRule, lnccRadiusMm, lnccWindow, bins, convergenceWindow, convergenceTolerance,
                preAlignment, symmetric);
    }

    public RegistrationConfig withConvergence(int window, double tolerance) {
        return new RegistrationConfig(metric, iterations, fluidSigmaMm, diffusionSigmaMm, fluidWeight, diffusionWeight,
                maxStepMm, updateRule, lnccRadiusMm, lnccWindow, miBins, window, tolerance, preAlignment, symmetric);
    }

    public RegistrationConfig withPreAlignment(PreAlignment p) {
        return new RegistrationConfig(metric, iterations, fluidSigmaMm, diffusionSigmaMm, fluidWeight, diffusionWeight,
                maxStepMm, updateRule, lnccRadiusMm, lnccWindow, miBins, convergenceWindow, convergenceTolerance,
                p, symmetric);
    }

    public RegistrationConfig withSymmetric(boolean sym) {
        return new RegistrationConfig(metric, iterations, fluidSigmaMm, diffusionSigmaMm, fluidWeight, diffusionWeight,
                maxStepMm, updateRule, lnccRadiusMm, lnccWindow, miBins, convergenceWindow, convergenceTolerance,
                preAlignment, sym);
    }

    @Override
    public boolean equals(Object o) {
        if (!(o instanceof RegistrationConfig)) {
            return false;
        }
        RegistrationConfig c = (RegistrationConfig) o;
        return metric == c.metric && Arrays.equals(iterations, c.iterations) && fluidSigmaMm == c.fluidSigmaMm
                && diffusionSigmaMm == c.diffusionSigmaMm && fluidWeight == c.fluidWeight
                && diffusionWeight == c.diffusionWeight && maxStepMm == c.maxStepMm && updateRule == c.updateRule
                && lnccRadiusMm == c.lnccRadiusMm && lnccWindow == c.lnccWindow && miBins == c.miBins
                && convergenceWindow == c.convergenceWindow && convergenceTolerance == c.convergenceTolerance
                && preAlignment == c.preAlignment && symmetric == c.symmetric;
    }

    @Override
    public int hashCode() {
        return 31 * Arrays.hashCode(iterations) + java.util.Objects.hash(metric, fluidSigmaMm, diffusionSigmaMm,
                fluidWeight, diffusionWeight, maxStepMm, updateRule, lnccRadiusMm, lnccWindow, miBins,
                convergenceWindow, convergenceTolerance, preAlignment, symmetric);
    }

    @Override
    public String toString() {
        return "RegistrationConfig[metric=" + metric + ", iterations=" + Arrays.toString(iterations)
                + ", fluidSigmaMm=" + fluidSigmaMm + ", diffusionSigmaMm=" + diffusionSigmaMm + ", fluidWeight="
                + fluidWeight + ", diffusionWeight=" + diffusionWeight + ", maxStepMm=" + maxStepMm + ", updateRule="
                + updateRule + ", lnccRadiusMm=" + lnccRadiusMm + ", lnccWindow=" + lnccWindow + ", miBins=" + miBins
                + ", convergenceWindow=" + convergenceWindow + ", convergenceTolerance=" + convergenceTolerance
                + ", preAlignment=" + preAlignment + ", symmetric=" + symmetric + "]";
    }

    private static void nonNegative(String name, double v) {
        if (!(v >= 0) || !Double.isFinite(v)) {
            throw new IllegalArgumentException(name + " must be finite and >= 0, got " + v);
        }
    }

    private static void positive(String name, double v) {
        if (!(v > 0) || !Double.isFinite(v)) {
            throw new IllegalArgumentException(name + " must be finite and > 0, got " + v);
        }
    }

    private static void unit(String name, double v) {
        if (!(v >= 0 && v <= 1)) {
            throw new IllegalArgumentException(name + " must be in [0, 1], got " + v);
        }
    }
}
