package org.turnmark.mechanics.material;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class MaterialTableTest {

    /** κ/μ = 2(1+ν)/(3(1−2ν)): 9.67 (ν 0.45), 49.67 (0.49), 99.67 (0.495) (REFERENCE §6, derived). */
    @Test
    void bulkModulusFollowsLinearElasticRelation() {
        assertEquals(9.6667, NeoHookeanMaterial.ofMuNu(1, 0.45, 1000).kappaKpa(), 1e-4);
        assertEquals(49.667, NeoHookeanMaterial.ofMuNu(1, 0.49, 1000).kappaKpa(), 1e-3);
        assertEquals(99.667, NeoHookeanMaterial.ofMuNu(1, 0.495, 1000).kappaKpa(), 1e-3);
        NeoHookeanMaterial m = NeoHookeanMaterial.ofMuNu(0.4, 0.3, 1000);
        assertEquals(0.3, m.nu(), 1e-12);
        assertEquals(2 * 0.4 * 1.3, m.youngKpa(), 1e-12);
    }

    /**
     * Simple shear F = I + γ e₁⊗e₂ has J = 1, so the compressible law gives the incompressible
     * closed forms exactly (Ogden 1984): σ₁₂ = μγ, σ₁₁ − σ₂₂ = μγ², σ₃₃ − σ₂₂ = 0.
     */
    @Test
    void simpleShearStressMatchesClosedForm() {
        NeoHookeanMaterial m = NeoHookeanMaterial.ofMuNu(0.7, 0.49, 1000);
        double gamma = 0.8;
        double[] f = {1, gamma, 0, 0, 1, 0, 0, 0, 1};
        double[] s = new double[9];
        m.cauchyStress(f, s);
        assertEquals(0.7 * gamma, s[1], 1e-14);
        assertEquals(s[1], s[3], 1e-15);
        assertEquals(0.7 * gamma * gamma, s[0] - s[4], 1e-14);
        assertEquals(0, s[8] - s[4], 1e-14);
    }

    @Test
    void energyVanishesAtIdentityAndIsInfiniteWhenFolded() {
        NeoHookeanMaterial m = NeoHookeanMaterial.ofMuNu(1, 0.45, 1000);
        assertEquals(0, m.energy(new double[] {1, 0, 0, 0, 1, 0, 0, 0, 1}), 1e-15);
        assertEquals(Double.POSITIVE_INFINITY, m.energy(new double[] {-1, 0, 0, 0, 1, 0, 0, 0, 1}));
    }

    @Test
    void nonPhysicalParametersAreRejectedWithLabelAndValue() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> MaterialTable.DEFAULTS.with(2, 0, 0.45, 1000));
        assertTrue(e.getMessage().contains("label 2") && e.getMessage().contains("mu") && e.getMessage().contains("0.0"),
                e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> MaterialTable.DEFAULTS.with(1, 0.3, 0.5, 1000));
        assertTrue(e.getMessage().contains("nu") && e.getMessage().contains("0.5"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> MaterialTable.DEFAULTS.with(5, 1, 0.45, -3));
        assertTrue(e.getMessage().contains("density") && e.getMessage().contains("-3"), e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> MaterialTable.DEFAULTS.with(1, -0.1, 0.45, 1000));
        assertThrows(IllegalArgumentException.class, () -> MaterialTable.DEFAULTS.with(4, 1, 0.45, 1000));
    }

    @Test
    void unknownLabelNamesTheLabel() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> MaterialTable.DEFAULTS.get(9));
        assertTrue(e.getMessage().contains("9"), e.getMessage());
    }

    /** Defaults follow REFERENCE §6 (values from memory where so marked in the class documentation). */
    @Test
    void defaultsHaveThePublishedOrdering() {
        MaterialTable d = MaterialTable.DEFAULTS;
        assertEquals(0.3, d.get(MaterialTable.FAT).muKpa(), 0);
        assertEquals(0.4, d.get(MaterialTable.FIBROGLANDULAR).muKpa(), 0);
        assertEquals(56, d.get(MaterialTable.SKIN).youngKpa(), 1e-9);
        double ratio = d.get(MaterialTable.LESION).muKpa() / d.get(MaterialTable.FIBROGLANDULAR).muKpa();
        assertTrue(ratio >= 3 && ratio <= 6, "lesion/gland stiffness ratio " + ratio);
    }
}
