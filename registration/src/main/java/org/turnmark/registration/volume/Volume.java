package org.turnmark.registration.volume;

import org.turnmark.geom.Grid3;

/**
 * A scalar image: a {@link Grid3} and one {@code float} per voxel, x fastest
 * ({@code data[i + nx*(j + ny*k)]}), values in the image's own units after NIfTI scaling.
 *
 * <p>The data array is shared, not copied: callers that need an independent volume use
 * {@link #copy()}. Not thread safe for concurrent writes.
 */
public final class Volume {

    private final Grid3 grid;
    private final float[] data;

    /**
     * @param grid the sampling grid
     * @param data voxel values, length {@code grid.size()}; kept by reference
     */
    public Volume(Grid3 grid, float[] data) {
        if (data.length != grid.size()) {
            throw new IllegalArgumentException("volume data length must equal grid size " + grid.size()
                    + ", got " + data.length);
        }
        this.grid = grid;
        this.data = data;
    }

    /** A zero-filled volume on {@code grid}. */
    public static Volume zeros(Grid3 grid) {
        return new Volume(grid, new float[grid.size()]);
    }

    public Grid3 grid() {
        return grid;
    }

    /** The voxel array itself (not a copy). */
    public float[] data() {
        return data;
    }

    /** Value at voxel (i, j, k); no bounds check beyond the array's. */
    public float get(int i, int j, int k) {
        return data[grid.index(i, j, k)];
    }

    /** A deep copy sharing only the (immutable) grid. */
    public Volume copy() {
        return new Volume(grid, data.clone());
    }
}
