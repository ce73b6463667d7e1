package org.turnmark.app.gui;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.stream.Stream;

import com.fasterxml.jackson.core.JsonProcessingException;

import org.turnmark.app.export.PlanJson;
import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.nifti.NiftiHeader;
import org.turnmark.registration.nifti.NiftiReader;

/**
 * What the GUI shows of a plan output folder: its {@code plan.json} (read with {@link PlanJson}),
 * the report PDF and the scalar NIfTI images in it, and the input images named by the case.
 * Predictions in the supine image frame are drawn on supine-frame images; mechanics-only predictions
 * in the prone frame (chest wall held in place) and the lesion centroids are drawn on prone-frame
 * images. Plain Java, immutable.
 *
 * @param dir      the folder
 * @param plan     the plan as read
 * @param report   the case-review PDF, or null
 * @param inputs   the case as used, in plain words
 * @param results  one row per lesion, method and frame
 * @param flags    quality flags and warnings in plain words
 * @param overlays predicted positions with their 95 % ellipsoids, and the prone centroids
 * @param images   viewable images, supine frame first
 */
public record PlanFolder(Path dir, PlanResult plan, Path report, List<InfoRow> inputs, List<ResultRow> results,
                         List<String> flags, List<Overlay> overlays, List<ImageChoice> images) {

    /** Affine entries agreeing within this (mm) count as the same grid: far below any voxel size. */
    static final double SAME_GRID_MM = 1e-3;

    /** Name of the plan file inside the folder. */
    public static final String PLAN_JSON = "plan.json";

    /** Where the plan and its report are, in one line. */
    public String describeLocation() {
        return "Output folder " + dir + (report == null ? " (no report PDF found)" : "  ·  report " + report);
    }

    /**
     * Reads a plan folder.
     *
     * @throws IOException if the folder has no plan.json or it cannot be read (the message names the file)
     */
    public static PlanFolder read(Path folder) throws IOException {
        Path dir = folder.toAbsolutePath().normalize();
        Path planFile = dir.resolve(PLAN_JSON);
        if (!Files.isRegularFile(planFile)) {
            throw new IOException(dir + " is not a plan folder: " + PLAN_JSON + " not found");
        }
        PlanResult plan;
        try {
            plan = PlanJson.read(planFile);
        } catch (JsonProcessingException e) {
            throw new IOException(planFile + ": not a plan this version can read: " + e.getOriginalMessage(), e);
        }
        List<InfoRow> inputs = new ArrayList<>();
        List<ImageChoice> images = new ArrayList<>();
        CaseFile c = plan.input();
        Grid3 supineGrid = null;
        if (c != null) {
            inputs.addAll(CaseSummary.rows(c));
            if (addIfExists(images, "supine image (input)", c.supineImage(), Overlay.Posture.SUPINE)) {
                try {
                    supineGrid = new NiftiReader().readHeader(Path.of(c.supineImage())).grid();
                } catch (IOException e) {
                    supineGrid = null;
                }
            }
        }
        if (plan.model() != null) {
            inputs.add(new InfoRow("Mesh", String.format(Locale.ROOT, "%d elements of %.1f mm, %d nodes, chest wall %s, "
                    + "%d nodes held at the image edge", plan.model().elements(), plan.model().elementSizeMm(),
                    plan.model().nodes(), plan.model().chestWall(), plan.model().fieldOfViewNodes())));
        }
        if (plan.uncertainty() != null) {
            inputs.add(new InfoRow("Uncertainty", plan.uncertainty().completed() + " of " + plan.uncertainty().samples()
                    + " samples completed (" + plan.uncertainty().design() + ")"));
        }
        List<ResultRow> rows = new ArrayList<>();
        List<Overlay> overlays = new ArrayList<>();
        if (plan.lesions() != null) {
            for (PlanResult.LesionResult l : plan.lesions()) {
                addLesion(l, rows, overlays);
            }
        }
        List<String> flags = new ArrayList<>();
        if (plan.flags() != null) {
            for (PlanResult.QualityFlag f : plan.flags()) {
                flags.add(severityWord(f.severity()) + " " + f.check() + ": " + f.message());
            }
        }
        if (plan.warnings() != null) {
            for (String w : plan.warnings()) {
                flags.add("Note: " + w);
            }
        }
        images.addAll(folderImages(dir, supineGrid));
        if (c != null) {
            addIfExists(images, "prone image (input)", c.proneImage(), Overlay.Posture.PRONE);
        }
        // Supine frame first (stable: input before outputs), then outputs in the prone frame, then the prone input.
        images.sort(Comparator.comparing(i -> i.posture() == Overlay.Posture.SUPINE ? 0 : 1));
        return new PlanFolder(dir, plan, findReport(dir), List.copyOf(inputs), List.copyOf(rows), List.copyOf(flags),
                List.copyOf(overlays), List.copyOf(images));
    }

    private static void addLesion(PlanResult.LesionResult l, List<ResultRow> rows, List<Overlay> overlays) {
        if (l.proneRasMm() != null) {
            overlays.add(new Overlay(l.id(), Overlay.Kind.LESION_MARK, Overlay.Posture.PRONE, l.proneRasMm(), null));
            rows.add(new ResultRow(l.id(), "prone centroid" + (l.refinement() == null ? "" : " (" + l.refinement() + ")"),
                    "prone image", ras(l.proneRasMm()), "—",
                    l.proneDescriptors() == null ? "" : l.proneDescriptors().summary()));
        }
        if (l.predictions() == null) {
            return;
        }
        for (PlanResult.Prediction p : l.predictions()) {
            if (p.positionRasMm() == null) {
                continue;
            }
            Overlay.Ellipsoid ell = null;
            String semi = "— (no uncertainty sampled)";
            PlanResult.EllipsoidSummary e = p.ellipsoid95();
            if (e != null && e.semiAxesMm() != null && e.axes() != null && e.semiAxesMm().length == 3) {
                ell = new Overlay.Ellipsoid(e.axes(), e.semiAxesMm(), e.probability());
                semi = String.format(Locale.ROOT, "%.1f, %.1f, %.1f mm", e.semiAxesMm()[0], e.semiAxesMm()[1],
                        e.semiAxesMm()[2]);
            }
            boolean supineFrame = PlanResult.FRAME_SUPINE.equals(p.frame());
            String frame = supineFrame ? "supine image" : "prone image, chest wall held";
            StringBuilder d = new StringBuilder(p.descriptors() == null ? "" : p.descriptors().summary());
            if (p.errorVsTruthMm() != null) {
                d.append(String.format(Locale.ROOT, "%serror vs synthetic truth %.1f mm", d.length() > 0 ? "; " : "",
                        p.errorVsTruthMm()));
            }
            rows.add(new ResultRow(l.id(), p.method(), frame, ras(p.positionRasMm()), semi, d.toString()));
            overlays.add(new Overlay(l.id() + " " + p.method(), kindOf(p.method()),
                    supineFrame ? Overlay.Posture.SUPINE : Overlay.Posture.PRONE, p.positionRasMm(), ell));
        }
    }

    static Overlay.Kind kindOf(String method) {
        if (PlanResult.HYBRID.equals(method)) {
            return Overlay.Kind.HYBRID;
        }
        if (PlanResult.REGISTRATION.equals(method)) {
            return Overlay.Kind.REGISTRATION;
        }
        if (PlanResult.MARKED.equals(method)) {
            return Overlay.Kind.LESION_MARK;
        }
        return Overlay.Kind.MECHANICS;
    }

    private static String severityWord(String severity) {
        if (PlanResult.QualityFlag.PROBLEM.equals(severity)) {
            return "PROBLEM —";
        }
        if (PlanResult.QualityFlag.WARNING.equals(severity)) {
            return "Warning —";
        }
        return "OK —";
    }

    private static String ras(double[] p) {
        return String.format(Locale.ROOT, "(%.1f, %.1f, %.1f) mm", p[0], p[1], p[2]);
    }

    private static boolean addIfExists(List<ImageChoice> images, String name, String path, Overlay.Posture posture) {
        if (path != null && Files.isRegularFile(Path.of(path))) {
            images.add(new ImageChoice(name, Path.of(path), posture));
            return true;
        }
        return false;
    }

    private static Path findReport(Path dir) throws IOException {
        try (Stream<Path> s = Files.list(dir)) {
            return s.filter(p -> p.getFileName().toString().toLowerCase(Locale.ROOT).endsWith(".pdf"))
                    .sorted().findFirst().orElse(null);
        }
    }

    /**
     * Scalar NIfTI images in the folder and its sub-folders (vector fields are skipped). An image on the
     * supine input image's grid is in the supine frame; any other is in the prone frame (without a supine
     * image every output is).
     */
    private static List<ImageChoice> folderImages(Path dir, Grid3 supineGrid) throws IOException {
        List<Path> files;
        // The planner writes images into sub-folders (warped/, labels/); one level down is enough.
        try (Stream<Path> s = Files.walk(dir, 2)) {
            files = s.filter(p -> {
                String n = p.getFileName().toString().toLowerCase(Locale.ROOT);
                return Files.isRegularFile(p) && (n.endsWith(".nii") || n.endsWith(".nii.gz"));
            }).sorted().toList();
        }
        List<ImageChoice> out = new ArrayList<>();
        NiftiReader reader = new NiftiReader();
        for (Path p : files) {
            NiftiHeader h;
            try {
                h = reader.readHeader(p);
                if (h.isVectorField() || h.components() > 1) {
                    continue;
                }
            } catch (IOException e) {
                continue;
            }
            String n = dir.relativize(p).toString().replace('\\', '/').replaceAll("(?i)\\.nii(\\.gz)?$", "");
            Overlay.Posture posture = supineGrid != null && h.grid().sameGrid(supineGrid, SAME_GRID_MM)
                    ? Overlay.Posture.SUPINE : Overlay.Posture.PRONE;
            out.add(new ImageChoice(n.replace('_', ' '), p, posture));
        }
        return out;
    }
}
