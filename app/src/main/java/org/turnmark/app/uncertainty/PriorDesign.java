package org.turnmark.app.uncertainty;

import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import java.util.random.RandomGenerator;

import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.random.SobolSequenceGenerator;

/**
 * A sampling design over the planner's priors: points u in the unit cube (Sobol sequence or Latin
 * hypercube) mapped through inverse cumulative distribution functions to parameter values.
 *
 * <p>Parameters (one cube dimension each, in {@link Parameter} order): the shear modulus of fat,
 * fibroglandular tissue, skin and lesion, log-normal {@code μ = median · gsd^z} with
 * {@code z = Φ⁻¹(u)}; Poisson's ratio, uniform on [min, max]; the chest-wall condition, sliding when
 * {@code u < P(sliding)}; two small rotations of the supine gravity direction (about the body's
 * superior axis: a roll on the table; about the right axis: a head-down/up tilt), each
 * {@code N(0, sd²)} degrees.
 *
 * <p>The Sobol design uses the unscrambled sequence of Commons Math without its first point (the
 * origin, which maps to −∞); its first point used is then the centre of the cube, the nominal
 * prediction's parameters (medians, mid-range ν). The Latin hypercube is seeded and deterministic.
 * Stateless after construction; thread safe.
 */
public final class PriorDesign {

    /** The sampled parameters, in cube-dimension order. */
    public enum Parameter {
        MU_FAT("fat stiffness", "mu_fat"),
        MU_FIBROGLANDULAR("fibroglandular stiffness", "mu_fibroglandular"),
        MU_SKIN("skin stiffness", "mu_skin"),
        MU_LESION("lesion stiffness", "mu_lesion"),
        NU("Poisson's ratio", "nu"),
        CHEST_WALL("chest wall sliding/fixed", "chest_wall"),
        GRAVITY_ROLL("gravity roll (about S-I)", "gravity_roll"),
        GRAVITY_PITCH("gravity pitch (about R-L)", "gravity_pitch");

        private final String label;
        private final String key;

        Parameter(String label, String key) {
            this.label = label;
            this.key = key;
        }

        /** Plain words for reports. */
        public String label() {
            return label;
        }

        /** A snake-case key for JSON and CSV. */
        public String key() {
            return key;
        }
    }

    /** Number of sampled parameters. */
    public static final int DIMENSIONS = Parameter.values().length;

    /**
     * The priors, in plain numbers.
     *
     * @param muMedianKpa       medians of μ for fat, fibroglandular, skin, lesion (kPa)
     * @param muGeometricSd     geometric standard deviations, ≥ 1, same order
     * @param nuMin             lower end of the uniform ν prior
     * @param nuMax             upper end (≥ nuMin, < 0.5)
     * @param slidingProbability P(chest wall slides), in [0, 1]
     * @param gravitySdDeg      standard deviation of each gravity rotation angle (degrees)
     */
    public record Spec(double[] muMedianKpa, double[] muGeometricSd, double nuMin, double nuMax,
                       double slidingProbability, double gravitySdDeg) {
        public Spec {
            if (muMedianKpa.length != 4 || muGeometricSd.length != 4) {
                throw new IllegalArgumentException("need 4 tissue medians and geometric SDs, got "
                        + muMedianKpa.length + " and " + muGeometricSd.length);
            }
            for (int t = 0; t < 4; t++) {
                if (!(muMedianKpa[t] > 0) || !(muGeometricSd[t] >= 1)) {
                    throw new IllegalArgumentException("tissue " + t + ": need median > 0 and gsd >= 1, got "
                            + muMedianKpa[t] + ", " + muGeometricSd[t]);
                }
            }
            if (!(nuMin <= nuMax && nuMax < 0.5 && nuMin > -1)) {
                throw new IllegalArgumentException("need -1 < nuMin <= nuMax < 0.5, got " + nuMin + ", " + nuMax);
            }
            if (!(slidingProbability >= 0 && slidingProbability <= 1) || !(gravitySdDeg >= 0)) {
                throw new IllegalArgumentException("need P(sliding) in [0, 1] and gravity SD >= 0, got "
                        + slidingProbability + ", " + gravitySdDeg);
            }
            muMedianKpa = muMedianKpa.clone();
            muGeometricSd = muGeometricSd.clone();
        }
    }

    /**
     * One point of the design.
     *
     * @param muKpa           shear moduli for fat, fibroglandular, skin, lesion (kPa)
     * @param nu              Poisson's ratio
     * @param sliding         true if the chest wall slides, false if fixed
     * @param gravityRollDeg  rotation of supine gravity about the superior axis (degrees)
     * @param gravityPitchDeg rotation of supine gravity about the right axis (degrees)
     * @param u               the unit-cube point (length {@link #DIMENSIONS})
     * @param score           standardised inputs for regression: z = Φ⁻¹(u) for the continuous
     *                        parameters, u itself for the chest-wall indicator
     */
    public record Sample(double[] muKpa, double nu, boolean sliding, double gravityRollDeg,
                         double gravityPitchDeg, double[] u, double[] score) {
    }

    private final Spec spec;
    private final NormalDistribution normal = new NormalDistribution(null, 0, 1);

    public PriorDesign(Spec spec) {
        this.spec = spec;
    }

    public Spec spec() {
        return spec;
    }

    /**
     * The design of {@code n} points.
     *
     * @param n      number of samples ≥ 0
     * @param design "sobol" or "latin-hypercube"
     * @param seed   seed for the Latin hypercube (ignored by Sobol)
     */
    public List<Sample> samples(int n, String design, long seed) {
        double[][] cube;
        if ("sobol".equals(design)) {
            cube = sobol(n);
        } else if ("latin-hypercube".equals(design)) {
            cube = latinHypercube(n, seed);
        } else {
            throw new IllegalArgumentException("design must be \"sobol\" or \"latin-hypercube\", got \"" + design + "\"");
        }
        List<Sample> out = new ArrayList<>(n);
        for (double[] u : cube) {
            out.add(map(u));
        }
        return out;
    }

    /** The nominal point: medians, mid-range ν, the more probable chest-wall condition, no tilt. */
    public Sample nominal() {
        double[] u = new double[DIMENSIONS];
        java.util.Arrays.fill(u, 0.5);
        // u = 0.5 gives "sliding" exactly when P(sliding) > 0.5; make 0.5 itself pick sliding too.
        u[Parameter.CHEST_WALL.ordinal()] = spec.slidingProbability() >= 0.5 ? 0 : 1;
        return map(u);
    }

    /**
     * One random draw from the priors: a point u uniform on the unit cube, one
     * {@code rng.nextDouble()} per dimension in {@link Parameter} order, mapped by {@link #map} (the
     * same inverse CDFs as the designs, so the draw follows exactly the distributions the planner
     * samples). Used to draw phantom truth from the planner's priors.
     *
     * @param rng the random source (for example a seeded {@link java.util.SplittableRandom} or
     *            {@link Random}); advanced by {@link #DIMENSIONS} doubles
     */
    public Sample draw(RandomGenerator rng) {
        double[] u = new double[DIMENSIONS];
        for (int d = 0; d < DIMENSIONS; d++) {
            u[d] = rng.nextDouble();
        }
        return map(u);
    }

    /** Maps a unit-cube point to parameter values through the inverse CDFs. */
    public Sample map(double[] u) {
        if (u.length != DIMENSIONS) {
            throw new IllegalArgumentException("need a point of " + DIMENSIONS + " coordinates, got " + u.length);
        }
        double[] score = new double[DIMENSIONS];
        double[] mu = new double[4];
        for (int t = 0; t < 4; t++) {
            double z = probit(u[t]);
            score[t] = z;
            mu[t] = spec.muMedianKpa()[t] * Math.pow(spec.muGeometricSd()[t], z);
        }
        int nuDim = Parameter.NU.ordinal();
        double nu = spec.nuMin() + (spec.nuMax() - spec.nuMin()) * u[nuDim];
        score[nuDim] = probit(u[nuDim]);
        int cw = Parameter.CHEST_WALL.ordinal();
        boolean sliding = u[cw] < spec.slidingProbability();
        score[cw] = sliding ? 1 : 0;
        int roll = Parameter.GRAVITY_ROLL.ordinal();
        int pitch = Parameter.GRAVITY_PITCH.ordinal();
        score[roll] = probit(u[roll]);
        score[pitch] = probit(u[pitch]);
        return new Sample(mu, nu, sliding, spec.gravitySdDeg() * score[roll], spec.gravitySdDeg() * score[pitch],
                u.clone(), score);
    }

    private double probit(double u) {
        // Clamp away from 0 and 1 (Latin-hypercube cells are open, but keep the map total).
        double v = Math.min(1 - 1e-12, Math.max(1e-12, u));
        return normal.inverseCumulativeProbability(v);
    }

    private static double[][] sobol(int n) {
        SobolSequenceGenerator g = new SobolSequenceGenerator(DIMENSIONS);
        g.nextVector(); // the origin
        double[][] out = new double[n][];
        for (int i = 0; i < n; i++) {
            out[i] = g.nextVector();
        }
        return out;
    }

    private static double[][] latinHypercube(int n, long seed) {
        Random rnd = new Random(seed);
        double[][] out = new double[n][DIMENSIONS];
        int[] perm = new int[n];
        for (int d = 0; d < DIMENSIONS; d++) {
            for (int i = 0; i < n; i++) {
                perm[i] = i;
            }
            for (int i = n - 1; i > 0; i--) {
                int j = rnd.nextInt(i + 1);
                int t = perm[i];
                perm[i] = perm[j];
                perm[j] = t;
            }
            for (int i = 0; i < n; i++) {
                out[i][d] = (perm[i] + rnd.nextDouble()) / n;
            }
        }
        return out;
    }
}
