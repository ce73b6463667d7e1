package org.turnmark.registration.transform;

/**
 * How two stationary velocity fields are combined into one whose exponential approximates
 * {@code exp(v) ∘ exp(w)}.
 */
public enum UpdateRule {
    /**
     * Baker–Campbell–Hausdorff truncated after the first Lie bracket:
     * {@code v + w + ½[v, w]}, {@code [v, w] = (Dv) w − (Dw) v} (Bossa et al., MICCAI 2007;
     * Vercauteren et al., NeuroImage 2009). Error third order in the field size.
     */
    BCH,
    /** Plain addition {@code v + w}: the first-order approximation. */
    ADDITION
}
