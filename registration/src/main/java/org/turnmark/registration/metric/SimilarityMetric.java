package org.turnmark.registration.metric;

/**
 * A similarity measure between a fixed image F and a warped moving image W sampled on the same grid,
 * written as a cost (lower is better) so that all measures are minimised. Only voxels with
 * {@code mask[n] != 0} take part (fixed mask ∧ moving mask ∧ inside the moving image).
 *
 * <p>Arrays are flat, x fastest, all of the grid's length. Implementations keep their workspaces
 * between calls and are therefore not thread safe; their kernels are parallel through
 * {@code org.turnmark.geom.Parallel} with a fixed partition, so results are bit-identical for any
 * thread count.
 */
public interface SimilarityMetric {

    /** Which measure this is. */
    MetricKind kind();

    /**
     * The cost over the mask.
     *
     * @throws IllegalArgumentException if the mask selects no voxel, or arrays have the wrong length
     */
    double cost(float[] fixed, float[] warped, byte[] mask);

    /**
     * The cost and its derivative with respect to each warped voxel value, {@code ∂cost/∂W(x)}
     * (zero outside the mask). With the image gradient ∇W this gives the descent direction for a
     * displacement update: {@code −∂cost/∂W(x) · ∇W(x)}.
     *
     * @param derivative output, overwritten; must alias no input
     */
    double costAndDerivative(float[] fixed, float[] warped, byte[] mask, float[] derivative);
}
