package org.turnmark.mechanics.element;

/** Finite-element formulation of the 8-node hexahedron. */
public enum HexFormulation {
    /**
     * Standard displacement (Q1) element, full 2×2×2 Gauss integration of ψ(F). Locks as ν → 0.5;
     * kept for like-for-like comparisons with other finite-element codes.
     */
    STANDARD_Q1,
    /**
     * Mean dilatation (Q1/P0 three-field element with element-constant pressure and dilatation
     * condensed out; Nagtegaal, Parks &amp; Rice 1974; Simo, Taylor &amp; Pister 1985): the isochoric
     * energy is integrated at the 2×2×2 Gauss points, the volumetric energy U(θ) uses the element
     * dilatation θ = v/V (current over reference element volume). Derived from an energy, so the
     * consistent tangent is symmetric. Does not lock as ν → 0.5. The default.
     */
    MEAN_DILATATION
}
