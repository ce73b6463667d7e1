package org.turnmark.registration.transform;

/**
 * Summary of a Jacobian determinant map inside a mask (REFERENCE §5).
 *
 * @param voxels             number of voxels summarised
 * @param minDet             smallest det J (dimensionless)
 * @param maxDet             largest det J
 * @param percentNonPositive percentage of voxels with det J ≤ 0 (folding), in %
 * @param meanLogDet         mean of ln det J over voxels with det J &gt; 0
 * @param sdLogDet           population standard deviation of ln det J over voxels with det J &gt; 0
 */
public record JacobianStats(long voxels, double minDet, double maxDet, double percentNonPositive,
                            double meanLogDet, double sdLogDet) {

    /** True if no voxel folds (every det J &gt; 0). */
    public boolean foldFree() {
        return minDet > 0;
    }
}
