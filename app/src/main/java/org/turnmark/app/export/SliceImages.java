package org.turnmark.app.export;

import java.awt.BasicStroke;
import java.awt.Color;
import java.awt.Font;
import java.awt.Graphics2D;
import java.awt.RenderingHints;
import java.awt.image.BufferedImage;
import java.util.List;

import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.Volume;

/**
 * Orthogonal slices of a volume through a world point, rendered at 1 mm per pixel for the report:
 * axial (x–y at the point's z), coronal (x–z) and sagittal (y–z). Screen orientation follows the
 * radiological habit: the patient's right on the left of the axial and coronal views, anterior up in
 * the axial view, superior up in the coronal and sagittal views; every picture is labelled with the
 * patient directions at its edges. Nearest-voxel sampling; grey levels from the 1st–99th percentile.
 */
final class SliceImages {

    enum Plane {
        AXIAL, CORONAL, SAGITTAL
    }

    /** Pixel size (mm). */
    static final double PIXEL_MM = 1.0;

    private SliceImages() {
    }

    /** A rendered slice and how its pixels map to world points. */
    record Slice(BufferedImage image, Plane plane, double[] origin, double[] uAxis, double[] vAxis) {
        /** World point of pixel (px, py). */
        double[] world(double px, double py) {
            return new double[] {origin[0] + px * uAxis[0] + py * vAxis[0], origin[1] + px * uAxis[1] + py * vAxis[1],
                origin[2] + px * uAxis[2] + py * vAxis[2]};
        }
    }

    /**
     * Renders a slice.
     *
     * @param vol     the image
     * @param labels  optional labels on any grid (overlay: label boundaries in colour), or null
     * @param through the world point the slice passes through
     */
    static Slice render(Volume vol, Volume labels, Plane plane, double[] through) {
        Grid3 g = vol.grid();
        double[][] box = bounds(g);
        double[] u;
        double[] v;
        double[] origin;
        int w;
        int h;
        // u: screen right, v: screen down.
        switch (plane) {
            case AXIAL -> {
                u = new double[] {-PIXEL_MM, 0, 0};
                v = new double[] {0, -PIXEL_MM, 0};
                origin = new double[] {box[1][0], box[1][1], through[2]};
                w = (int) Math.ceil(box[1][0] - box[0][0]) + 1;
                h = (int) Math.ceil(box[1][1] - box[0][1]) + 1;
            }
            case CORONAL -> {
                u = new double[] {-PIXEL_MM, 0, 0};
                v = new double[] {0, 0, -PIXEL_MM};
                origin = new double[] {box[1][0], through[1], box[1][2]};
                w = (int) Math.ceil(box[1][0] - box[0][0]) + 1;
                h = (int) Math.ceil(box[1][2] - box[0][2]) + 1;
            }
            default -> {
                u = new double[] {0, PIXEL_MM, 0};
                v = new double[] {0, 0, -PIXEL_MM};
                origin = new double[] {through[0], box[0][1], box[1][2]};
                w = (int) Math.ceil(box[1][1] - box[0][1]) + 1;
                h = (int) Math.ceil(box[1][2] - box[0][2]) + 1;
            }
        }
        float[] sorted = vol.data().clone();
        java.util.Arrays.sort(sorted);
        float lo = sorted[(int) (0.01 * (sorted.length - 1))];
        float hi = sorted[(int) (0.99 * (sorted.length - 1))];
        float range = hi > lo ? hi - lo : 1;
        BufferedImage img = new BufferedImage(w, h, BufferedImage.TYPE_INT_RGB);
        Affine3D w2v = g.worldToVoxel();
        int[] lab = labels == null ? null : new int[w * h];
        Affine3D lw2v = labels == null ? null : labels.grid().worldToVoxel();
        Slice s = new Slice(img, plane, origin, u, v);
        for (int py = 0; py < h; py++) {
            for (int px = 0; px < w; px++) {
                double[] p = s.world(px, py);
                double[] c = w2v.applyPoint(p[0], p[1], p[2]);
                int i = (int) Math.round(c[0]);
                int j = (int) Math.round(c[1]);
                int k = (int) Math.round(c[2]);
                int grey = 0;
                if (g.contains(i, j, k)) {
                    grey = (int) Math.max(0, Math.min(255, 255 * (vol.data()[g.index(i, j, k)] - lo) / range));
                }
                img.setRGB(px, py, (grey << 16) | (grey << 8) | grey);
                if (lab != null) {
                    double[] lc = lw2v.applyPoint(p[0], p[1], p[2]);
                    int li = (int) Math.round(lc[0]);
                    int lj = (int) Math.round(lc[1]);
                    int lk = (int) Math.round(lc[2]);
                    Grid3 lg = labels.grid();
                    lab[px + w * py] = lg.contains(li, lj, lk) ? (int) labels.data()[lg.index(li, lj, lk)] : 0;
                }
            }
        }
        if (lab != null) {
            Color[] colours = {null, new Color(255, 220, 0), new Color(0, 200, 255), new Color(255, 120, 200),
                new Color(255, 60, 60), new Color(0, 255, 0)};
            for (int py = 1; py < h - 1; py++) {
                for (int px = 1; px < w - 1; px++) {
                    int l = lab[px + w * py];
                    boolean edge = l != lab[px - 1 + w * py] || l != lab[px + 1 + w * py] || l != lab[px + w * (py - 1)]
                            || l != lab[px + w * (py + 1)];
                    if (edge && l > 0 && l < colours.length) {
                        img.setRGB(px, py, colours[l].getRGB());
                    }
                }
            }
        }
        return s;
    }

    /** Draws a cross at a world point and the outline of each ellipsoid's section in the slice. */
    static void mark(Slice s, double[] point, Color colour, String label) {
        double[] px = pixel(s, point);
        Graphics2D gr = s.image().createGraphics();
        gr.setRenderingHint(RenderingHints.KEY_ANTIALIASING, RenderingHints.VALUE_ANTIALIAS_ON);
        gr.setColor(colour);
        gr.setStroke(new BasicStroke(1.5f));
        int x = (int) Math.round(px[0]);
        int y = (int) Math.round(px[1]);
        gr.drawLine(x - 6, y, x - 2, y);
        gr.drawLine(x + 2, y, x + 6, y);
        gr.drawLine(x, y - 6, x, y - 2);
        gr.drawLine(x, y + 2, x, y + 6);
        if (label != null) {
            gr.setFont(new Font(Font.SANS_SERIF, Font.BOLD, 10));
            gr.drawString(label, x + 7, y - 4);
        }
        gr.dispose();
    }

    /** Outlines where the slice cuts the ellipsoid (boundary pixels of the contained region). */
    static void outline(Slice s, Ellipsoid e, Color colour) {
        BufferedImage img = s.image();
        int w = img.getWidth();
        int h = img.getHeight();
        boolean[] in = new boolean[w * h];
        double[] c = pixel(s, e.centerRasMm());
        int r = (int) Math.ceil(e.semiAxesMm()[0] / PIXEL_MM) + 2;
        for (int py = Math.max(0, (int) c[1] - r); py < Math.min(h, (int) c[1] + r); py++) {
            for (int px = Math.max(0, (int) c[0] - r); px < Math.min(w, (int) c[0] + r); px++) {
                in[px + w * py] = e.contains(s.world(px, py));
            }
        }
        for (int py = 1; py < h - 1; py++) {
            for (int px = 1; px < w - 1; px++) {
                int n = px + w * py;
                if (in[n] && (!in[n - 1] || !in[n + 1] || !in[n - w] || !in[n + w])) {
                    img.setRGB(px, py, colour.getRGB());
                }
            }
        }
    }

    /** Direction letters at the edges and a title. */
    static void annotate(Slice s, String title) {
        Graphics2D gr = s.image().createGraphics();
        gr.setColor(Color.WHITE);
        gr.setFont(new Font(Font.SANS_SERIF, Font.PLAIN, 10));
        String[] lr = switch (s.plane()) {
            case AXIAL -> new String[] {"R", "L", "A", "P"};
            case CORONAL -> new String[] {"R", "L", "S", "I"};
            default -> new String[] {"P", "A", "S", "I"};
        };
        int w = s.image().getWidth();
        int h = s.image().getHeight();
        gr.drawString(lr[0], 2, h / 2);
        gr.drawString(lr[1], w - 9, h / 2);
        gr.drawString(lr[2], w / 2, 11);
        gr.drawString(lr[3], w / 2, h - 3);
        gr.drawString(title, 2, 11);
        gr.dispose();
    }

    static double[] pixel(Slice s, double[] p) {
        double[] d = {p[0] - s.origin()[0], p[1] - s.origin()[1], p[2] - s.origin()[2]};
        double[] u = s.uAxis();
        double[] v = s.vAxis();
        double uu = u[0] * u[0] + u[1] * u[1] + u[2] * u[2];
        double vv = v[0] * v[0] + v[1] * v[1] + v[2] * v[2];
        return new double[] {(d[0] * u[0] + d[1] * u[1] + d[2] * u[2]) / uu, (d[0] * v[0] + d[1] * v[1] + d[2] * v[2]) / vv};
    }

    private static double[][] bounds(Grid3 g) {
        double[] lo = {Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY};
        double[] hi = {Double.NEGATIVE_INFINITY, Double.NEGATIVE_INFINITY, Double.NEGATIVE_INFINITY};
        for (int corner = 0; corner < 8; corner++) {
            double[] p = g.worldOf((corner & 1) == 0 ? 0 : g.nx() - 1, (corner & 2) == 0 ? 0 : g.ny() - 1,
                    (corner & 4) == 0 ? 0 : g.nz() - 1);
            for (int a = 0; a < 3; a++) {
                lo[a] = Math.min(lo[a], p[a]);
                hi[a] = Math.max(hi[a], p[a]);
            }
        }
        return new double[][] {lo, hi};
    }

    /** Colours per method, shared by the slices and the legend. */
    static Color colour(String method) {
        return switch (method) {
            case "hybrid" -> new Color(0, 230, 0);
            case "registration-only" -> new Color(255, 160, 0);
            case "marked" -> new Color(255, 255, 0);
            default -> new Color(0, 170, 255);
        };
    }

    static List<Plane> planes() {
        return List.of(Plane.AXIAL, Plane.CORONAL, Plane.SAGITTAL);
    }
}
