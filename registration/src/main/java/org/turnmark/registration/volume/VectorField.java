package org.turnmark.registration.volume;

import org.turnmark.geom.Grid3;

/**
 * A 3-vector per voxel on a {@link Grid3}: three component arrays (RAS x, y, z, in mm), each x
 * fastest like {@link Volume}. Used for displacement fields ({@code x ↦ x + u(x)}) and stationary
 * velocity fields; what the vectors mean (direction of the map) is stated by whoever produces them.
 * Arrays are kept by reference.
 */
public final class VectorField {

    private final Grid3 grid;
    private final float[] x;
    private final float[] y;
    private final float[] z;

    /**
     * @param grid the sampling grid
     * @param x    RAS x components (mm), length {@code grid.size()}
     * @param y    RAS y components (mm)
     * @param z    RAS z components (mm)
     */
    public VectorField(Grid3 grid, float[] x, float[] y, float[] z) {
        int n = grid.size();
        if (x.length != n || y.length != n || z.length != n) {
            throw new IllegalArgumentException("vector field components must each have " + n + " values, got "
                    + x.length + ", " + y.length + ", " + z.length);
        }
        this.grid = grid;
        this.x = x;
        this.y = y;
        this.z = z;
    }

    /** A zero field on {@code grid}. */
    public static VectorField zeros(Grid3 grid) {
        int n = grid.size();
        return new VectorField(grid, new float[n], new float[n], new float[n]);
    }

    public Grid3 grid() {
        return grid;
    }

    /** RAS x components (mm), the array itself. */
    public float[] x() {
        return x;
    }

    /** RAS y components (mm), the array itself. */
    public float[] y() {
        return y;
    }

    /** RAS z components (mm), the array itself. */
    public float[] z() {
        return z;
    }

    /** Component array c (0 = x, 1 = y, 2 = z), the array itself. */
    public float[] component(int c) {
        switch (c) {
            case 0:
                return x;
            case 1:
                return y;
            case 2:
                return z;
            default:
                throw new IllegalArgumentException("component must be 0, 1 or 2, got " + c);
        }
    }

    /** A deep copy. */
    public VectorField copy() {
        return new VectorField(grid, x.clone(), y.clone(), z.clone());
    }
}
