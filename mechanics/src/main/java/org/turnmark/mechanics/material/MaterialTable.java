package org.turnmark.mechanics.material;

import java.util.Collections;
import java.util.Map;
import java.util.TreeMap;

/**
 * Materials per tissue label. Label conventions: 1 fat, 2 fibroglandular, 3 skin, 5 lesion (0 air
 * and 4 chest wall are not meshed). Immutable; {@link #with} returns a modified copy. Thread safe.
 *
 * <p>Default values (all neo-Hookean, small-strain ν = 0.49, so κ/μ ≈ 49.7):
 * <ul>
 *   <li>1 fat: μ = 0.3 kPa (neo-Hookean fit to gravity loading, Carter et al., SPIE Medical Imaging
 *       2006, from memory); density 911 kg/m³ (from memory).</li>
 *   <li>2 fibroglandular: μ = 0.4 kPa (same source, from memory); density 1041 kg/m³ (from
 *       memory).</li>
 *   <li>3 skin: E ≈ 56 kPa by in-vivo aspiration, so μ = E/(2(1+ν)) = 18.8 kPa; density
 *       1000 kg/m³ (soft tissue ≈ 1000 kg/m³, common practice).</li>
 *   <li>5 lesion: 4 × fibroglandular, μ = 1.6 kPa (carcinomas 3–6 × fibroglandular stiffness,
 *       Samani et al., Phys Med Biol 52:1565, 2007); density 1041 kg/m³ (taken as gland).</li>
 * </ul>
 * Stiffness values in the literature span an order of magnitude (gravity-fitted vs small-strain
 * indentation); treat them as a wide prior, not as patient facts.
 */
public final class MaterialTable {

    /** Label of fat. */
    public static final int FAT = 1;
    /** Label of fibroglandular tissue. */
    public static final int FIBROGLANDULAR = 2;
    /** Label of skin. */
    public static final int SKIN = 3;
    /** Label of the chest wall / pectoral muscle (rigid, never meshed). */
    public static final int CHEST_WALL = 4;
    /** Label of a lesion. */
    public static final int LESION = 5;

    /** Default small-strain Poisson's ratio (near-incompressible soft tissue, REFERENCE §6: 0.45–0.499). */
    public static final double DEFAULT_NU = 0.49;

    /** The defaults listed in the class documentation. */
    public static final MaterialTable DEFAULTS = new MaterialTable(defaultMap());

    private final Map<Integer, NeoHookeanMaterial> byLabel;

    private MaterialTable(Map<Integer, NeoHookeanMaterial> byLabel) {
        this.byLabel = Collections.unmodifiableMap(new TreeMap<>(byLabel));
    }

    private static Map<Integer, NeoHookeanMaterial> defaultMap() {
        Map<Integer, NeoHookeanMaterial> m = new TreeMap<>();
        m.put(FAT, NeoHookeanMaterial.ofMuNu(0.3, DEFAULT_NU, 911));
        m.put(FIBROGLANDULAR, NeoHookeanMaterial.ofMuNu(0.4, DEFAULT_NU, 1041));
        m.put(SKIN, NeoHookeanMaterial.ofMuNu(56.0 / (2 * (1 + DEFAULT_NU)), DEFAULT_NU, 1000));
        m.put(LESION, NeoHookeanMaterial.ofMuNu(1.6, DEFAULT_NU, 1041));
        return m;
    }

    /** An empty table (add labels with {@link #with}). */
    public static MaterialTable empty() {
        return new MaterialTable(Map.of());
    }

    /** A table giving every label 1, 2, 3 and 5 the same material (for tests and phantoms). */
    public static MaterialTable uniform(NeoHookeanMaterial material) {
        Map<Integer, NeoHookeanMaterial> m = new TreeMap<>();
        m.put(FAT, material);
        m.put(FIBROGLANDULAR, material);
        m.put(SKIN, material);
        m.put(LESION, material);
        return new MaterialTable(m);
    }

    /** A copy with {@code label} mapped to {@code material}. */
    public MaterialTable with(int label, NeoHookeanMaterial material) {
        if (label == 0 || label == CHEST_WALL) {
            throw new IllegalArgumentException("label " + label + " (" + name(label)
                    + ") is not meshed and cannot have a material");
        }
        if (label < 0) {
            throw new IllegalArgumentException("label must be >= 0, got " + label);
        }
        Map<Integer, NeoHookeanMaterial> m = new TreeMap<>(byLabel);
        m.put(label, material);
        return new MaterialTable(m);
    }

    /**
     * A copy with {@code label} mapped to a material from μ (kPa), ν and density (kg/m³).
     *
     * @throws IllegalArgumentException naming the label, the parameter and its value when invalid
     */
    public MaterialTable with(int label, double muKpa, double nu, double densityKgM3) {
        NeoHookeanMaterial mat;
        try {
            mat = NeoHookeanMaterial.ofMuNu(muKpa, nu, densityKgM3);
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException("label " + label + " (" + name(label) + "): " + e.getMessage(), e);
        }
        return with(label, mat);
    }

    /** True if the table has a material for {@code label}. */
    public boolean contains(int label) {
        return byLabel.containsKey(label);
    }

    /**
     * The material of {@code label}.
     *
     * @throws IllegalArgumentException if the label has no material, listing the known labels
     */
    public NeoHookeanMaterial get(int label) {
        NeoHookeanMaterial m = byLabel.get(label);
        if (m == null) {
            throw new IllegalArgumentException("no material for tissue label " + label + " (" + name(label)
                    + "); known labels: " + byLabel.keySet());
        }
        return m;
    }

    /** Label → material, ordered by label, unmodifiable. */
    public Map<Integer, NeoHookeanMaterial> asMap() {
        return byLabel;
    }

    /** Human-readable name of a label of the project's convention. */
    public static String name(int label) {
        switch (label) {
            case 0:
                return "air/outside";
            case FAT:
                return "fat";
            case FIBROGLANDULAR:
                return "fibroglandular";
            case SKIN:
                return "skin";
            case CHEST_WALL:
                return "chest wall";
            case LESION:
                return "lesion";
            default:
                return "unknown";
        }
    }

    @Override
    public String toString() {
        StringBuilder sb = new StringBuilder("MaterialTable{");
        byLabel.forEach((k, v) -> sb.append(' ').append(k).append(" (").append(name(k)).append("): ")
                .append(v).append(';'));
        return sb.append(" }").toString();
    }
}
