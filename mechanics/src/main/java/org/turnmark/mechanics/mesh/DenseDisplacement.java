package org.turnmark.mechanics.mesh;

import org.turnmark.geom.Grid3;

/**
 * A displacement field sampled on an image grid by {@link DisplacementFieldSampler}: at voxel
 * centre p (RAS mm, in the map's source configuration), p + u(p) is the image of p in the target
 * configuration. Three component arrays (RAS x, y, z, mm), x fastest like the grid, ready to be
 * stored as a NIfTI displacement vector field. Arrays are kept by reference.
 *
 * @param grid          the sampling grid
 * @param ux            RAS x components (mm)
 * @param uy            RAS y components (mm)
 * @param uz            RAS z components (mm)
 * @param inside        per voxel 1 if its centre lies inside the tissue (the map is defined), else 0
 * @param insideCount   number of inside voxels
 * @param extrapolation the policy that filled the outside voxels
 */
public record DenseDisplacement(Grid3 grid, float[] ux, float[] uy, float[] uz, byte[] inside, int insideCount,
                                Extrapolation extrapolation) {

    /**
     * How voxels outside the tissue are filled.
     *
     * @param kind    the policy
     * @param decayMm for {@link Kind#NEAREST_DECAY}: the length L (mm) of the decay; ignored otherwise
     */
    public record Extrapolation(Kind kind, double decayMm) {

        /** The policies. */
        public enum Kind {
            /** Outside voxels get u = 0. */
            ZERO,
            /**
             * Outside voxels get the displacement of the nearest inside voxel times exp(−(d/L)²), d its
             * distance (mm): continuous at the tissue surface, with zero normal derivative there, and
             * fading to 0 a few L away.
             */
            NEAREST_DECAY
        }

        /** Validates the decay length. */
        public Extrapolation {
            if (kind == Kind.NEAREST_DECAY && !(decayMm > 0 && Double.isFinite(decayMm))) {
                throw new IllegalArgumentException("decay length must be a finite number > 0 mm, got " + decayMm);
            }
        }

        /** The zero policy. */
        public static Extrapolation zero() {
            return new Extrapolation(Kind.ZERO, 0);
        }

        /** The nearest-surface extension with decay length {@code decayMm}. */
        public static Extrapolation nearestDecay(double decayMm) {
            return new Extrapolation(Kind.NEAREST_DECAY, decayMm);
        }
    }
}
