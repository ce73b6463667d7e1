package org.turnmark.app.gui;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.turnmark.app.pipeline.CaseFile;

/** The inputs of a case in plain words with units, for the inputs table. Plain Java. */
final class CaseSummary {

    private CaseSummary() {
    }

    static List<InfoRow> rows(CaseFile c) {
        List<InfoRow> rows = new ArrayList<>();
        rows.add(new InfoRow("Case", c.caseId() == null ? "(unnamed)" : c.caseId()));
        if (c.description() != null && !c.description().isBlank()) {
            rows.add(new InfoRow("Description", c.description()));
        }
        rows.add(new InfoRow("Prone image", fileName(c.proneImage())));
        rows.add(new InfoRow("Supine image", c.supineImage() == null
                ? "none: mechanics-only prediction and descriptors only" : fileName(c.supineImage())));
        rows.add(new InfoRow("Labels", c.labels() == null ? "none: automatic segmentation" : fileName(c.labels())));
        rows.add(new InfoRow("Laterality", c.laterality()));
        for (CaseFile.LesionMark m : c.lesions()) {
            StringBuilder sb = new StringBuilder();
            if (m.positionRasMm() != null) {
                sb.append(ras(m.positionRasMm()));
            } else if (m.positionVoxel() != null) {
                double[] v = m.positionVoxel();
                sb.append(String.format(Locale.ROOT, "voxel (%.1f, %.1f, %.1f)", v[0], v[1], v[2]));
            }
            if (m.side() != null) {
                sb.append(", ").append(m.side()).append(" side");
            }
            if (m.radiusMm() != null) {
                sb.append(String.format(Locale.ROOT, ", refined within %.1f mm", m.radiusMm()));
            }
            if (m.label() != null) {
                sb.append(", label ").append(m.label());
            }
            rows.add(new InfoRow("Lesion " + m.id(), sb.toString()));
        }
        if (c.nipples() != null) {
            for (CaseFile.NippleMark n : c.nipples()) {
                rows.add(new InfoRow("Nipple " + n.side(), ras(n.positionRasMm())));
            }
        }
        CaseFile.ModelOptions mo = c.model();
        if (mo != null) {
            rows.add(new InfoRow("Model", String.format(Locale.ROOT, "elements %s mm, chest wall %s, gravity %s m/s²",
                    num(mo.elementSizeMm()), mo.chestWall() == null ? "from prior" : mo.chestWall(),
                    num(mo.gravityMS2()))));
        }
        CaseFile.Priors p = c.priors();
        if (p != null) {
            if (p.fat() != null && p.fibroglandular() != null) {
                rows.add(new InfoRow("Stiffness priors", String.format(Locale.ROOT,
                        "μ fat %s kPa ×/÷ %s, fibroglandular %s kPa ×/÷ %s (log-normal)",
                        num(p.fat().muKpaMedian()), num(p.fat().muGeometricSd()),
                        num(p.fibroglandular().muKpaMedian()), num(p.fibroglandular().muGeometricSd()))));
            }
            if (p.nu() != null) {
                rows.add(new InfoRow("Poisson's ratio", String.format(Locale.ROOT, "%s to %s (nominal %s)",
                        num(p.nu().min()), num(p.nu().max()), num(p.nu().nominal()))));
            }
            rows.add(new InfoRow("Other priors", String.format(Locale.ROOT,
                    "sliding chest wall p = %s, gravity ± %s°, marking ± %s mm, registration ± %s mm, "
                            + "mechanics in the supine frame ± %s mm, in the prone frame × %s on the sampled "
                            + "covariance (× %s when the chest is in view) ± %s mm (SD)",
                    num(p.chestWallSlidingProbability()), num(p.gravityDirectionSdDeg()),
                    num(p.lesionMarkingSdMm()), num(p.registrationSdMm()), num(p.mechanicsSupineSdMm()),
                    num(p.mechanicsProneScale()), num(p.mechanicsProneScaleWideField()), num(p.mechanicsProneSdMm()))));
        }
        CaseFile.UncertaintyOptions u = c.uncertainty();
        if (u != null) {
            rows.add(new InfoRow("Uncertainty", u.samples() != null && u.samples() == 0
                    ? "nominal prediction only (no samples)"
                    : u.samples() + " samples, " + u.design() + " design, seed " + u.seed()));
        }
        return rows;
    }

    static String ras(double[] p) {
        return String.format(Locale.ROOT, "RAS (%.1f, %.1f, %.1f) mm", p[0], p[1], p[2]);
    }

    private static String num(Double d) {
        if (d == null) {
            return "default";
        }
        return String.format(Locale.ROOT, "%.4g", d).replaceAll("\\.?0+$", "");
    }

    private static String fileName(String path) {
        Path p = Path.of(path);
        return p.getFileName() + "  (" + (p.getParent() == null ? "" : p.getParent()) + ")";
    }
}
