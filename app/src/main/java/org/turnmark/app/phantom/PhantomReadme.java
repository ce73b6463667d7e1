package org.turnmark.app.phantom;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.turnmark.app.pipeline.DefaultPriors;
import org.turnmark.app.uncertainty.PriorDesign;
import org.turnmark.geom.ResearchUse;
import org.turnmark.mechanics.material.MaterialTable;

/** The README of a generated case folder and the truth-conditions block of its JSON files. */
final class PhantomReadme {

    private PhantomReadme() {
    }

    static Map<String, Object> conditionsJson(TruthMechanics.Conditions k) {
        if (k.priorDraw() != null) {
            return priorConditionsJson(k);
        }
        Map<String, Object> m = new LinkedHashMap<>();
        Map<String, Object> mu = new LinkedHashMap<>();
        int[] labels = {MaterialTable.FAT, MaterialTable.FIBROGLANDULAR, MaterialTable.SKIN, MaterialTable.LESION};
        for (int l : labels) {
            mu.put(MaterialTable.name(l), PhantomWriter.round(k.muKpa()[l]));
        }
        m.put("shear_modulus_kpa", mu);
        m.put("shear_modulus_draw", "per tissue, log-normal about the planner's default, geometric SD "
                + TruthMechanics.STIFFNESS_GSD + ", truncated at " + TruthMechanics.MAX_Z + " SD");
        m.put("poisson_ratio", k.nu());
        m.put("fat_and_gland_density_scale", PhantomWriter.round(k.densityScale()));
        m.put("chest_wall", "sliding");
        m.put("supine_torso_rotation_deg_about_z", PhantomWriter.round(k.torsoRotationDeg()));
        m.put("supine_table_shift_mm", java.util.List.of(PhantomWriter.round(k.tableShiftMm()[0]),
                PhantomWriter.round(k.tableShiftMm()[1]), PhantomWriter.round(k.tableShiftMm()[2])));
        m.put("prone_gravity_m_s2", java.util.List.of(0.0, TruthMechanics.G, 0.0));
        m.put("supine_gravity_body_frame_m_s2", java.util.List.of(PhantomWriter.round(k.supineGravityMs2()[0]),
                PhantomWriter.round(k.supineGravityMs2()[1]), PhantomWriter.round(k.supineGravityMs2()[2])));
        m.put("elements", k.elements());
        m.put("nodes", k.nodes());
        m.put("chest_wall_nodes", k.chestWallNodes());
        m.put("prone_min_det_f", PhantomWriter.round(k.prone().minDetF()));
        m.put("supine_min_det_f", PhantomWriter.round(k.supine().minDetF()));
        m.put("prone_max_displacement_mm", PhantomWriter.round(k.prone().maxDisplacementMm()));
        m.put("supine_max_displacement_mm", PhantomWriter.round(k.supine().maxDisplacementMm()));
        return m;
    }

    /**
     * The conditions of a truth drawn from the planner's priors: the draw itself at full precision
     * (μ per tissue in kPa, ν, chest-wall condition, gravity roll and pitch in degrees), the prior it
     * was drawn from, and the rigid torso placement.
     */
    private static Map<String, Object> priorConditionsJson(TruthMechanics.Conditions k) {
        PriorDesign.Sample d = k.priorDraw();
        PriorDesign.Spec spec = DefaultPriors.spec();
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("truth_mode", PhantomOptions.Truth.PRIORS.key());
        m.put("drawn_from", "one draw from the planner's default priors (docs/case-format.md, priors), seeded by "
                + "the phantom seed; no truncation");
        Map<String, Object> mu = new LinkedHashMap<>();
        Map<String, Object> prior = new LinkedHashMap<>();
        Map<String, Object> medians = new LinkedHashMap<>();
        Map<String, Object> gsd = new LinkedHashMap<>();
        Map<String, Object> rho = new LinkedHashMap<>();
        for (int t = 0; t < 4; t++) {
            String name = MaterialTable.name(TISSUE_LABELS[t]);
            mu.put(name, d.muKpa()[t]);
            medians.put(name, spec.muMedianKpa()[t]);
            gsd.put(name, spec.muGeometricSd()[t]);
            rho.put(name, k.densityKgM3()[TISSUE_LABELS[t]]);
        }
        m.put("shear_modulus_kpa", mu);
        m.put("poisson_ratio", d.nu());
        m.put("chest_wall", d.sliding() ? "sliding" : "fixed");
        m.put("chest_wall_rule", "the planner's: fixed, or sliding on the wall normal with the rim of the contact "
                + "(chest-wall nodes on the skin) fixed");
        m.put("gravity_roll_deg", d.gravityRollDeg());
        m.put("gravity_pitch_deg", d.gravityPitchDeg());
        m.put("density_kg_m3", rho);
        m.put("prior_unit_cube_point", d.u());
        prior.put("shear_modulus_median_kpa", medians);
        prior.put("shear_modulus_geometric_sd", gsd);
        prior.put("poisson_ratio_uniform", List.of(spec.nuMin(), spec.nuMax()));
        prior.put("chest_wall_sliding_probability", spec.slidingProbability());
        prior.put("gravity_direction_sd_deg", spec.gravitySdDeg());
        m.put("prior", prior);
        m.put("supine_torso_rotation_deg_about_z", PhantomWriter.round(k.torsoRotationDeg()));
        m.put("supine_table_shift_mm", List.of(PhantomWriter.round(k.tableShiftMm()[0]),
                PhantomWriter.round(k.tableShiftMm()[1]), PhantomWriter.round(k.tableShiftMm()[2])));
        m.put("torso_placement", "rigid placement of the supine image frame only (the planner's rigid alignment "
                + "removes it); gravity in the body frame does not turn with it");
        m.put("prone_gravity_m_s2", List.of(0.0, TruthMechanics.G, 0.0));
        m.put("supine_gravity_body_frame_m_s2", List.of(k.supineGravityMs2()[0], k.supineGravityMs2()[1],
                k.supineGravityMs2()[2]));
        m.put("elements", k.elements());
        m.put("nodes", k.nodes());
        m.put("chest_wall_nodes", k.chestWallNodes());
        m.put("prone_min_det_f", PhantomWriter.round(k.prone().minDetF()));
        m.put("supine_min_det_f", PhantomWriter.round(k.supine().minDetF()));
        m.put("prone_max_displacement_mm", PhantomWriter.round(k.prone().maxDisplacementMm()));
        m.put("supine_max_displacement_mm", PhantomWriter.round(k.supine().maxDisplacementMm()));
        return m;
    }

    private static final int[] TISSUE_LABELS = {MaterialTable.FAT, MaterialTable.FIBROGLANDULAR, MaterialTable.SKIN,
        MaterialTable.LESION};

    static String text(PhantomCase c, String caseId, String command) {
        PhantomOptions o = c.options();
        TruthMechanics.Conditions k = c.conditions();
        var g = c.grid();
        StringBuilder sb = new StringBuilder();
        sb.append("# Sample case `").append(caseId).append("` (synthetic phantom)\n\n");
        sb.append("> ").append(ResearchUse.FULL).append("\n\n");
        sb.append("Invented anatomy made by Turnmark's phantom generator; no patient data. Regenerate with:\n\n");
        sb.append("```sh\n").append(command).append("\n```\n\n");
        sb.append("## Content\n\n");
        sb.append(String.format(Locale.ROOT, "- Grid %d x %d x %d voxels of %.2f mm (RAS+, axis-aligned), "
                + "the same for every image.%n", g.nx(), g.ny(), g.nz(), o.spacingMm()));
        sb.append(String.format(Locale.ROOT, "- %d breast(s) (%s), %.0f ml each, projection %.2f, ptosis %.2f; "
                + "%d lesion(s) of %.1f mm; %s contrast; SNR %.1f.%n", o.breasts(),
                o.breasts() == 2 ? "right and left" : o.side(), o.breastVolumeMl(), o.projection(), o.ptosis(),
                o.lesionCount(), o.lesionDiameterMm(), o.contrast() == PhantomOptions.Contrast.T1
                        ? "T1-weighted-like (fat bright)" : "fat-suppressed contrast-enhanced-like (lesion bright)",
                o.snr()));
        sb.append("- `prone.nii.gz`, `supine.nii.gz`: MR-like images (int16, arbitrary units), Rician noise with "
                + "sigma = mean breast-tissue signal / SNR, smooth bias field, partial-volume blur.\n");
        sb.append("- `prone_labels.nii.gz`, `supine_labels.nii.gz`: labels 0 air, 1 fat, 2 fibroglandular, "
                + "3 skin (at least one voxel thick), 4 chest wall / pectoral muscle, 5 lesion.\n");
        sb.append("- `case.json`: the planner's case file (`docs/case-format.md`).\n\n");
        sb.append("## Truth files (`truth/`)\n\n");
        sb.append("- `displacement_prone_to_supine.nii.gz`: NIfTI intent 1006, RAS mm on the prone grid; for a "
                + "prone point x, x + u(x) is the same material point in the supine image "
                + "(sidecar `displacement_prone_to_supine.json`).\n");
        sb.append("- `lesion_centroids.csv`, `truth.json`: lesion centroids and nipple tips in the reference, prone "
                + "and supine configurations (RAS mm).\n");
        sb.append("- `landmarks.csv`: ").append(c.landmarkProne().length / 3)
                .append(" duct branch points as (prone, supine) pairs, RAS mm, for target registration error.\n");
        sb.append("- `reference_labels.nii.gz`: the gravity-free reference anatomy.\n\n");
        if (k.priorDraw() != null) {
            priorConditionsText(sb, k, o);
        } else {
            defaultConditionsText(sb, k, o);
        }
        sb.append("## Licence\n\nCC0 1.0 Universal: to the extent possible under law, the authors have waived all "
                + "copyright and related or neighbouring rights to this synthetic case "
                + "(https://creativecommons.org/publicdomain/zero/1.0/).\n");
        return sb.toString();
    }

    private static void priorConditionsText(StringBuilder sb, TruthMechanics.Conditions k, PhantomOptions o) {
        PriorDesign.Sample d = k.priorDraw();
        PriorDesign.Spec spec = DefaultPriors.spec();
        double[] med = spec.muMedianKpa();
        double[] gsd = spec.muGeometricSd();
        sb.append("## Truth conditions: one draw from the planner's default priors\n\n");
        sb.append(String.format(Locale.ROOT, "- Shear moduli (log-normal, median x/÷ geometric SD): fat %.4g kPa "
                + "(%.3g, %.2g), fibroglandular %.4g kPa (%.3g, %.2g), skin %.4g kPa (%.3g, %.2g), lesion %.4g kPa "
                + "(%.3g, %.2g).%n", d.muKpa()[0], med[0], gsd[0], d.muKpa()[1], med[1], gsd[1], d.muKpa()[2], med[2],
                gsd[2], d.muKpa()[3], med[3], gsd[3]));
        sb.append(String.format(Locale.ROOT, "- Poisson's ratio %.4f for every tissue (uniform on [%.3f, %.3f]).%n",
                d.nu(), spec.nuMin(), spec.nuMax()));
        sb.append(String.format(Locale.ROOT, "- Chest wall %s (sliding with probability %.2f, else fixed; when "
                + "sliding, the rim of the contact stays fixed, as in the planner).%n",
                d.sliding() ? "sliding" : "fixed", spec.slidingProbability()));
        sb.append(String.format(Locale.ROOT, "- Supine gravity in the body frame turned by a roll of %.2f deg about "
                + "the body axis (z) and a pitch of %.2f deg about the right axis (x) (each normal, SD %.1f deg).%n",
                d.gravityRollDeg(), d.gravityPitchDeg(), spec.gravitySdDeg()));
        sb.append(String.format(Locale.ROOT, "- Densities as the planner's defaults: fat %.0f, fibroglandular %.0f, "
                + "skin %.0f, lesion %.0f kg/m3.%n", k.densityKgM3()[MaterialTable.FAT],
                k.densityKgM3()[MaterialTable.FIBROGLANDULAR], k.densityKgM3()[MaterialTable.SKIN],
                k.densityKgM3()[MaterialTable.LESION]));
        sb.append(String.format(Locale.ROOT, "- Not from the priors: the supine torso placed turned by %.2f deg "
                + "about the body axis (z) and shifted by (%.2f, %.2f, %.2f) mm on the table, a rigid placement of "
                + "the supine image only (the planner's rigid alignment removes it; gravity in the body frame does "
                + "not turn with it); and the truth mesh: %.1f mm hexahedra (%d elements) of the reference anatomy, "
                + "the truth being the finite-element displacement interpolated at the image spacing.%n%n",
                k.torsoRotationDeg(), k.tableShiftMm()[0], k.tableShiftMm()[1], k.tableShiftMm()[2], o.elementMm(),
                k.elements()));
    }

    private static void defaultConditionsText(StringBuilder sb, TruthMechanics.Conditions k, PhantomOptions o) {
        sb.append("## Truth conditions that differ from the planner's defaults\n\n");
        sb.append(String.format(Locale.ROOT, "- Shear moduli drawn per tissue (log-normal about the defaults, "
                + "geometric SD %.1f): fat %.3f kPa (default 0.3), fibroglandular %.3f kPa (0.4), skin %.2f kPa "
                + "(18.8), lesion %.3f kPa (1.6).%n", TruthMechanics.STIFFNESS_GSD, k.muKpa()[1], k.muKpa()[2],
                k.muKpa()[3], k.muKpa()[5]));
        sb.append(String.format(Locale.ROOT, "- Poisson's ratio %.2f for every tissue (default 0.49).%n", k.nu()));
        sb.append(String.format(Locale.ROOT, "- Fat and gland densities scaled by %.3f (defaults 911 and 1041 kg/m3)."
                + "%n", k.densityScale()));
        sb.append(String.format(Locale.ROOT, "- Supine torso turned by %.2f deg about the body axis (z) and shifted "
                + "by (%.2f, %.2f, %.2f) mm on the table; supine gravity in the body frame turns with it "
                + "(the default assumes none).%n", k.torsoRotationDeg(), k.tableShiftMm()[0], k.tableShiftMm()[1],
                k.tableShiftMm()[2]));
        sb.append(String.format(Locale.ROOT, "- Truth mesh: %.1f mm hexahedra (%d elements), the truth is the "
                + "finite-element displacement interpolated at the image spacing; chest wall sliding "
                + "(same as the default).%n%n", o.elementMm(), k.elements()));
    }
}
