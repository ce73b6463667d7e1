package org.turnmark.app.export;

import java.awt.Color;
import java.awt.image.BufferedImage;
import java.io.File;
import java.io.IOException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.apache.pdfbox.pdmodel.PDDocument;
import org.apache.pdfbox.pdmodel.PDPage;
import org.apache.pdfbox.pdmodel.PDPageContentStream;
import org.apache.pdfbox.pdmodel.common.PDRectangle;
import org.apache.pdfbox.pdmodel.font.PDFont;
import org.apache.pdfbox.pdmodel.font.PDType0Font;
import org.apache.pdfbox.pdmodel.font.PDType1Font;
import org.apache.pdfbox.pdmodel.font.Standard14Fonts;
import org.apache.pdfbox.pdmodel.graphics.image.LosslessFactory;
import org.apache.pdfbox.pdmodel.graphics.image.PDImageXObject;
import org.jfree.chart.ChartFactory;
import org.jfree.chart.JFreeChart;
import org.jfree.chart.plot.PlotOrientation;
import org.jfree.data.category.DefaultCategoryDataset;

import org.turnmark.app.pipeline.PlanArtifacts;
import org.turnmark.app.pipeline.PlanResult;
import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.app.uncertainty.Sensitivity;
import org.turnmark.geom.ResearchUse;
import org.turnmark.registration.volume.Volume;

/**
 * The case-review report (PDF, A4): inputs and summary, quality flags, segmentation check pictures,
 * axial/coronal/sagittal slices through each lesion prone (with the mark) and supine (with each
 * method's prediction and the section of its 95 % ellipsoid), the table of coordinates and
 * descriptors, and a plot of the uncertainty per parameter. The research-use-only caution is printed
 * at the foot of every page. Rendered headless (PDFBox, JFreeChart); DejaVu Sans when installed
 * (Debian {@code fonts-dejavu-core}), else Helvetica with non-Latin-1 symbols spelled out.
 */
public final class ReportPdf {

    private static final String DEJAVU = "/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf";
    private static final float MARGIN = 40;
    private static final float FOOTER = 52;

    private ReportPdf() {
    }

    /** Writes the report atomically. */
    public static void write(PlanResult plan, PlanArtifacts art, Path path) throws IOException {
        try (PDDocument doc = new PDDocument()) {
            Pages pages = new Pages(doc);
            summary(pages, plan);
            segmentation(pages, plan, art);
            slices(pages, plan, art);
            table(pages, plan);
            sensitivity(pages, plan);
            pages.close();
            AtomicFiles.write(path, doc::save);
        }
    }

    private static void summary(Pages p, PlanResult plan) throws IOException {
        p.heading("Turnmark case review: " + plan.input().caseId());
        p.line("RESEARCH USE ONLY - not a medical device, not for diagnosis or treatment decisions.", 10, true);
        p.gap(4);
        p.line("Created " + plan.createdUtc() + " by turnmark " + plan.software().get("turnmark") + " (Java "
                + plan.software().get("java") + ")", 9, false);
        if (plan.input().description() != null) {
            p.wrapped(plan.input().description(), 9);
        }
        p.gap(6);
        p.line("Inputs", 11, true);
        p.wrapped("prone image: " + plan.input().proneImage(), 8);
        p.line("supine image: " + (plan.input().supineImage() == null ? "none (mechanics-only plan)" : plan.input().supineImage()), 8, false);
        p.line("labels: " + (plan.input().labels() == null ? "automatic segmentation (check the pictures)" : plan.input().labels()), 8, false);
        for (Map.Entry<String, String> e : plan.inputSha256().entrySet()) {
            p.line("SHA-256 " + e.getKey() + ": " + e.getValue(), 7, false);
        }
        PlanResult.ModelSummary m = plan.model();
        p.wrapped(String.format(Locale.ROOT, "model: %d hexahedra, %d nodes, element %.1f mm, chest wall %s (%d nodes), "
                        + "%d nodes held where the field of view cuts the tissue", m.elements(), m.nodes(),
                m.elementSizeMm(), m.chestWall(), m.chestWallNodes(), m.fieldOfViewNodes()), 8);
        PlanResult.UncertaintySummary u = plan.uncertainty();
        p.wrapped(String.format(Locale.ROOT, "uncertainty: %d of %d %s prior samples solved; added in closed form: %s",
                u.completed(), u.samples(), u.design(), String.join("; ", u.addedAnalytically())), 8);
        p.gap(6);
        p.line("Predicted supine lesion centroids (world RAS mm)", 11, true);
        for (PlanResult.LesionResult l : plan.lesions()) {
            p.line(String.format(Locale.ROOT, "%s (%s breast), prone centroid (%.1f, %.1f, %.1f) mm, %s", l.id(), l.side(),
                    l.proneRasMm()[0], l.proneRasMm()[1], l.proneRasMm()[2], l.refinement()), 8, true);
            for (PlanResult.Prediction pr : l.predictions()) {
                String ell = pr.ellipsoid95() == null ? "no ellipsoid" : String.format(Locale.ROOT,
                        "95 %% semi-axes %.1f, %.1f, %.1f mm", pr.ellipsoid95().semiAxesMm()[0],
                        pr.ellipsoid95().semiAxesMm()[1], pr.ellipsoid95().semiAxesMm()[2]);
                String err = pr.errorVsTruthMm() == null ? "" : String.format(Locale.ROOT, ", error vs truth %.1f mm",
                        pr.errorVsTruthMm());
                p.wrapped(String.format(Locale.ROOT, "  %s [%s]: (%.1f, %.1f, %.1f) mm; %s%s", pr.method(), pr.frame(),
                        pr.positionRasMm()[0], pr.positionRasMm()[1], pr.positionRasMm()[2], ell, err), 8);
            }
        }
        p.gap(6);
        p.line("Quality flags", 11, true);
        for (PlanResult.QualityFlag f : plan.flags()) {
            p.wrapped("[" + f.severity().toUpperCase(Locale.ROOT) + "] " + f.check() + ": " + f.message(), 8);
        }
        if (!plan.warnings().isEmpty()) {
            p.gap(4);
            p.line("Warnings", 11, true);
            for (String w : plan.warnings()) {
                p.wrapped("- " + w, 8);
            }
        }
    }

    private static void segmentation(Pages p, PlanResult plan, PlanArtifacts art) throws IOException {
        p.newPage();
        p.heading("Segmentation check (prone)");
        p.wrapped("Label boundaries on the prone image through the first lesion: yellow fat, cyan fibroglandular, "
                + "pink skin, red chest wall, green lesion. " + (art.segmented()
                ? "The labels come from the automatic segmentation: check them before trusting the plan."
                : "The labels were given with the case."), 8);
        double[] at = plan.lesions().get(0).proneRasMm();
        List<BufferedImage> imgs = new ArrayList<>();
        for (SliceImages.Plane pl : SliceImages.planes()) {
            SliceImages.Slice s = SliceImages.render(art.prone(), art.labels(), pl, at);
            SliceImages.annotate(s, pl.name().toLowerCase(Locale.ROOT));
            imgs.add(s.image());
        }
        p.images(imgs, 170);
    }

    private static void slices(Pages p, PlanResult plan, PlanArtifacts art) throws IOException {
        for (int li = 0; li < plan.lesions().size(); li++) {
            PlanResult.LesionResult l = plan.lesions().get(li);
            p.newPage();
            p.heading("Lesion " + l.id() + ": prone (top) and supine (bottom)");
            List<BufferedImage> top = new ArrayList<>();
            for (SliceImages.Plane pl : SliceImages.planes()) {
                SliceImages.Slice s = SliceImages.render(art.prone(), null, pl, l.proneRasMm());
                SliceImages.mark(s, l.proneRasMm(), SliceImages.colour(PlanResult.MARKED), l.id());
                SliceImages.annotate(s, "prone " + pl.name().toLowerCase(Locale.ROOT));
                top.add(s.image());
            }
            p.images(top, 165);
            // Supine frame if there is a supine image; else the mechanics-warped prone image (prone frame).
            boolean supine = art.supine() != null;
            String frame = supine ? PlanResult.FRAME_SUPINE : PlanResult.FRAME_PRONE;
            Volume bg = supine ? art.supine() : art.warped().get("mechanics");
            PlanResult.Prediction centre = null;
            for (PlanResult.Prediction pr : l.predictions()) {
                if (frame.equals(pr.frame()) && (centre == null || PlanResult.HYBRID.equals(pr.method()))) {
                    centre = pr;
                }
            }
            List<Ellipsoid> ells = art.ellipsoids95().getOrDefault(frame, List.of());
            List<BufferedImage> bottom = new ArrayList<>();
            for (SliceImages.Plane pl : SliceImages.planes()) {
                SliceImages.Slice s = SliceImages.render(bg, null, pl, centre.positionRasMm());
                for (PlanResult.Prediction pr : l.predictions()) {
                    if (!frame.equals(pr.frame())) {
                        continue;
                    }
                    Color c = SliceImages.colour(pr.method());
                    for (Ellipsoid e : ells) {
                        if (java.util.Arrays.equals(e.centerRasMm(), pr.positionRasMm())) {
                            SliceImages.outline(s, e, c);
                        }
                    }
                    SliceImages.mark(s, pr.positionRasMm(), c, null);
                }
                SliceImages.annotate(s, (supine ? "supine " : "predicted supine shape, prone frame: ")
                        + pl.name().toLowerCase(Locale.ROOT));
                bottom.add(s.image());
            }
            p.images(bottom, 165);
            p.wrapped("Marks: yellow the prone centroid; blue mechanics-only, green hybrid, orange registration-only; "
                    + "outlines: sections of the 95 % ellipsoids (probability content 95 % in 3-D).", 8);
        }
    }

    private static void table(Pages p, PlanResult plan) throws IOException {
        p.newPage();
        p.heading("Coordinates and descriptors");
        p.wrapped("Clock face as seen facing the patient (12 superior; lateral 9 o'clock right, 3 o'clock left); "
                + "depth third along nipple to chest wall; distance from the nipple in cm. Descriptors are per "
                + "posture: clock positions change more than distances between postures.", 8);
        for (LesionsCsv.Row r : LesionsCsv.rows(plan)) {
            p.wrapped(tableLine(r), 8);
            p.gap(2);
        }
    }

    /** One line of the coordinates and descriptors table, from a {@code lesions.csv} row. */
    static String tableLine(LesionsCsv.Row r) {
        String wall = r.get("depth_from_chest_wall_mm");
        return String.format(Locale.ROOT, "%s %s | %s [%s] | RAS (%s, %s, %s) mm | 95%% axes %s/%s/%s mm | %s %s, "
                        + "%s third, %s cm from nipple, %s mm below skin, %s%s",
                r.get("lesion_id"), r.get("side"), r.get("method"), r.get("frame"), r.get("x_ras_mm"),
                r.get("y_ras_mm"), r.get("z_ras_mm"), dash(r.get("semi_axis_1_mm_95")), dash(r.get("semi_axis_2_mm_95")),
                dash(r.get("semi_axis_3_mm_95")), r.get("clock"), r.get("quadrant"), r.get("depth_third"),
                r.get("distance_from_nipple_cm"), r.get("depth_from_skin_mm"),
                wall.isEmpty() ? "depth from chest wall not available (no chest-wall surface)" : wall + " mm above chest wall",
                r.get("error_vs_truth_mm").isEmpty() ? "" : " | error vs truth " + r.get("error_vs_truth_mm") + " mm");
    }

    private static String dash(String s) {
        return s.isEmpty() ? "-" : s;
    }

    private static void sensitivity(Pages p, PlanResult plan) throws IOException {
        for (PlanResult.LesionResult l : plan.lesions()) {
            for (PlanResult.Prediction pr : l.predictions()) {
                Sensitivity.Ranking r = pr.sensitivity();
                if (r == null || !PlanResult.FRAME_PRONE.equals(pr.frame())) {
                    continue;
                }
                p.newPage();
                p.heading("Uncertainty per parameter: lesion " + l.id() + ", " + pr.method());
                p.wrapped("Movement of the predicted position (mm, 3-D) per one standard deviation of each prior "
                        + "parameter, from a linear regression on the sampled solves (" + r.method() + (r.explainedVariance() == null
                        ? "" : String.format(Locale.ROOT, ", R² = %.2f", r.explainedVariance())) + ").", 8);
                DefaultCategoryDataset ds = new DefaultCategoryDataset();
                for (Sensitivity.Effect e : r.effects()) {
                    ds.addValue(e.effectMm(), "effect", e.parameter());
                }
                JFreeChart chart = ChartFactory.createBarChart(null, "parameter", "mm per standard deviation", ds,
                        PlotOrientation.HORIZONTAL, false, false, false);
                chart.setBackgroundPaint(Color.WHITE);
                p.images(List.of(chart.createBufferedImage(900, 500)), 280);
            }
        }
    }

    /** A simple top-down page writer with the caution in every footer. */
    private static final class Pages {
        private final PDDocument doc;
        private final PDFont font;
        private final PDFont bold;
        private final boolean unicode;
        private PDPage page;
        private PDPageContentStream cs;
        private float y;

        Pages(PDDocument doc) throws IOException {
            this.doc = doc;
            File f = new File(DEJAVU);
            File fb = new File(DEJAVU.replace("DejaVuSans.ttf", "DejaVuSans-Bold.ttf"));
            if (f.isFile() && fb.isFile()) {
                font = PDType0Font.load(doc, f);
                bold = PDType0Font.load(doc, fb);
                unicode = true;
            } else {
                font = new PDType1Font(Standard14Fonts.FontName.HELVETICA);
                bold = new PDType1Font(Standard14Fonts.FontName.HELVETICA_BOLD);
                unicode = false;
            }
            newPage();
        }

        void newPage() throws IOException {
            if (cs != null) {
                cs.close();
            }
            page = new PDPage(PDRectangle.A4);
            doc.addPage(page);
            cs = new PDPageContentStream(doc, page);
            y = page.getMediaBox().getHeight() - MARGIN;
            // Footer: the full caution, small, wrapped.
            float fy = FOOTER - 12;
            for (String s : wrap(ResearchUse.FULL, 150)) {
                text(s, MARGIN, fy, 6.5f, false);
                fy -= 8;
            }
        }

        void close() throws IOException {
            cs.close();
        }

        private void ensure(float h) throws IOException {
            if (y - h < FOOTER + 10) {
                newPage();
            }
        }

        void heading(String s) throws IOException {
            line(s, 14, true);
            gap(4);
        }

        void gap(float h) {
            y -= h;
        }

        void line(String s, float size, boolean isBold) throws IOException {
            ensure(size + 3);
            y -= size + 3;
            text(s, MARGIN, y, size, isBold);
        }

        void wrapped(String s, float size) throws IOException {
            int chars = (int) ((page.getMediaBox().getWidth() - 2 * MARGIN) / (size * 0.52f));
            for (String l : wrap(s, chars)) {
                line(l, size, false);
            }
        }

        void images(List<BufferedImage> imgs, float height) throws IOException {
            ensure(height + 6);
            float x = MARGIN;
            float avail = page.getMediaBox().getWidth() - 2 * MARGIN;
            float total = 0;
            for (BufferedImage b : imgs) {
                total += height * b.getWidth() / (float) b.getHeight();
            }
            float scale = Math.min(1, (avail - 6 * (imgs.size() - 1)) / total);
            float h = height * scale;
            y -= h + 6;
            for (BufferedImage b : imgs) {
                float w = h * b.getWidth() / (float) b.getHeight();
                PDImageXObject xo = LosslessFactory.createFromImage(doc, b);
                cs.drawImage(xo, x, y, w, h);
                x += w + 6;
            }
        }

        private void text(String s, float x, float ty, float size, boolean isBold) throws IOException {
            cs.beginText();
            cs.setFont(isBold ? bold : font, size);
            cs.newLineAtOffset(x, ty);
            cs.showText(unicode ? s : latin1(s));
            cs.endText();
        }

        private static String latin1(String s) {
            String t = s.replace("χ", "chi").replace("²", "2").replace("≤", "<=").replace("→", "->").replace("σ", "sd")
                    .replace("–", "-").replace("×", "x").replace("·", "*");
            StringBuilder sb = new StringBuilder();
            for (char c : t.toCharArray()) {
                sb.append(c < 256 ? c : '?');
            }
            return sb.toString();
        }

        private static List<String> wrap(String s, int chars) {
            List<String> out = new ArrayList<>();
            StringBuilder cur = new StringBuilder();
            for (String w : s.split(" ")) {
                if (cur.length() + w.length() + 1 > chars && cur.length() > 0) {
                    out.add(cur.toString());
                    cur.setLength(0);
                }
                if (cur.length() > 0) {
                    cur.append(' ');
                }
                cur.append(w);
            }
            if (cur.length() > 0) {
                out.add(cur.toString());
            }
            return out;
        }
    }
}
