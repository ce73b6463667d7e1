package org.turnmark.registration.resample;

import java.util.Locale;

/**
 * Thrown when a sample point lies outside the grid under {@link Outside#FAIL}, or when a sample
 * coordinate is not a number. Carries the continuous voxel coordinate and the grid size.
 */
public final class OutsideGridException extends RuntimeException {

    private static final long serialVersionUID = 1L;

    private final double i;
    private final double j;
    private final double k;

    /**
     * @param i  continuous voxel coordinate along i
     * @param j  continuous voxel coordinate along j
     * @param k  continuous voxel coordinate along k
     * @param nx grid size along i
     * @param ny grid size along j
     * @param nz grid size along k
     */
    public OutsideGridException(double i, double j, double k, int nx, int ny, int nz) {
        super(String.format(Locale.ROOT,
                "sample point (i, j, k) = (%.6g, %.6g, %.6g) lies outside the %dx%dx%d grid "
                        + "(expected each coordinate in [0, n-1])", i, j, k, nx, ny, nz));
        this.i = i;
        this.j = j;
        this.k = k;
    }

    /** Offending continuous voxel coordinate along i. */
    public double i() {
        return i;
    }

    /** Offending continuous voxel coordinate along j. */
    public double j() {
        return j;
    }

    /** Offending continuous voxel coordinate along k. */
    public double k() {
        return k;
    }
}
