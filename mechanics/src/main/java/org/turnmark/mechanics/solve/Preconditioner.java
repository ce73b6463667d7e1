package org.turnmark.mechanics.solve;

/** A symmetric positive definite approximation M of A⁻¹ for conjugate gradients. Not thread safe. */
interface Preconditioner {

    /** Prepares for matrix {@code a} (its values may change between calls; the pattern may not). */
    void setup(BlockCsr a);

    /**
     * Cheaper update after the values of the same matrix changed moderately (e.g. the next Newton
     * iteration); the default redoes {@link #setup}.
     */
    default void refresh(BlockCsr a) {
        setup(a);
    }

    /**
     * As {@link #refresh}, after the caller added {@code sigma}·I to the matrix (a diagonal shift,
     * absolute, in the matrix's units; 0 for none) — the default redoes {@link #setup}.
     */
    default void refresh(BlockCsr a, double sigma) {
        setup(a);
    }

    /** A current single-precision copy of {@code a}, if this preconditioner keeps one, else null. */
    default UpperFloatMatrix singlePrecision(BlockCsr a) {
        return null;
    }

    /** z = M r; z must not alias r. */
    void apply(double[] r, double[] z);
}
