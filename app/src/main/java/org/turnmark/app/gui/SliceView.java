package org.turnmark.app.gui;

import java.util.Locale;
import java.util.function.Consumer;

import javafx.geometry.VPos;
import javafx.scene.canvas.Canvas;
import javafx.scene.canvas.GraphicsContext;
import javafx.scene.image.PixelFormat;
import javafx.scene.image.WritableImage;
import javafx.scene.input.MouseButton;
import javafx.scene.input.MouseEvent;
import javafx.scene.input.ScrollEvent;
import javafx.scene.layout.Region;
import javafx.scene.paint.Color;
import javafx.scene.text.Font;
import javafx.scene.text.FontWeight;
import javafx.scene.text.TextAlignment;

/**
 * One orthogonal slice view: draws the slice rendered by the {@link ViewerViewModel}, the patient
 * direction at each screen side, the crosshair, and the overlays of the displayed posture (points with
 * labels, 95 % ellipsoid sections). A click or drag reports the world point under the mouse; the
 * mouse wheel steps the slice by one display pixel along the view's fixed axis. A dumb view: all
 * state lives in the ViewModel.
 */
public final class SliceView extends Region {

    private static final double MARGIN = 22;
    private static final int ELLIPSE_POINTS = 72;

    private final ViewerViewModel vm;
    private final SlicePlane plane;
    private final Consumer<double[]> onClick;
    private final Canvas canvas = new Canvas();
    private SliceRenderer.Image image;
    private WritableImage fxImage;
    private double scale = 1;
    private double originX;
    private double originY;

    /**
     * @param vm      the viewer state
     * @param plane   which view
     * @param onClick receives the world point (RAS mm, new array) under a click or drag
     */
    public SliceView(ViewerViewModel vm, SlicePlane plane, Consumer<double[]> onClick) {
        this.vm = vm;
        this.plane = plane;
        this.onClick = onClick;
        getChildren().add(canvas);
        setId("slice-" + plane.name().toLowerCase(Locale.ROOT));
        setMinSize(120, 120);
        setPrefSize(360, 320);
        setStyle("-fx-background-color: #11161c;");
        Runnable rerender = this::rerender;
        vm.volumeProperty().addListener((o, a, b) -> rerender.run());
        vm.windowCenterProperty().addListener((o, a, b) -> rerender.run());
        vm.windowWidthProperty().addListener((o, a, b) -> rerender.run());
        // Only the crosshair coordinate this view is cut at changes its pixels; the others move lines.
        crosshairProperty(plane.fixedAxis()).addListener((o, a, b) -> rerender.run());
        crosshairProperty(plane.horizontalAxis()).addListener((o, a, b) -> draw());
        crosshairProperty(plane.verticalAxis()).addListener((o, a, b) -> draw());
        vm.overlays().addListener((javafx.collections.ListChangeListener<Overlay>) c -> draw());
        canvas.addEventHandler(MouseEvent.MOUSE_PRESSED, this::mouse);
        canvas.addEventHandler(MouseEvent.MOUSE_DRAGGED, this::mouse);
        canvas.addEventHandler(ScrollEvent.SCROLL, this::scroll);
    }

    /** Which view this is. */
    public SlicePlane plane() {
        return plane;
    }

    private javafx.beans.property.DoubleProperty crosshairProperty(int axis) {
        return axis == 0 ? vm.crosshairXProperty() : axis == 1 ? vm.crosshairYProperty() : vm.crosshairZProperty();
    }

    @Override
    protected void layoutChildren() {
        double w = getWidth();
        double h = getHeight();
        if (canvas.getWidth() != w || canvas.getHeight() != h) {
            canvas.setWidth(w);
            canvas.setHeight(h);
            draw();
        }
    }

    private void rerender() {
        image = vm.render(plane);
        if (image == null) {
            fxImage = null;
        } else {
            SliceFrame f = image.frame();
            if (fxImage == null || (int) fxImage.getWidth() != f.width() || (int) fxImage.getHeight() != f.height()) {
                fxImage = new WritableImage(f.width(), f.height());
            }
            fxImage.getPixelWriter().setPixels(0, 0, f.width(), f.height(), PixelFormat.getIntArgbInstance(),
                    image.argb(), 0, f.width());
        }
        draw();
    }

    /** Screen point → world point (RAS mm) under it, or null without an image. */
    public double[] worldAtScreen(double sx, double sy) {
        if (image == null) {
            return null;
        }
        return image.frame().worldAt((sx - originX) / scale, (sy - originY) / scale);
    }

    /** World point → screen point {x, y} on this canvas (projected onto the plane), or null without an image. */
    public double[] screenOfWorld(double[] rasMm) {
        if (image == null) {
            return null;
        }
        double[] p = image.frame().screenOf(rasMm);
        return new double[] {originX + p[0] * scale, originY + p[1] * scale};
    }

    private void mouse(MouseEvent e) {
        if (e.getButton() != MouseButton.PRIMARY) {
            return;
        }
        double[] w = worldAtScreen(e.getX(), e.getY());
        if (w != null) {
            onClick.accept(w);
        }
    }

    private void scroll(ScrollEvent e) {
        if (image == null || e.getDeltaY() == 0) {
            return;
        }
        double[] c = vm.crosshair();
        c[plane.fixedAxis()] += Math.signum(e.getDeltaY()) * image.frame().pixelMm();
        vm.moveCrosshair(c);
    }

    private void draw() {
        GraphicsContext g = canvas.getGraphicsContext2D();
        double w = canvas.getWidth();
        double h = canvas.getHeight();
        g.setFill(Color.web("#11161c"));
        g.fillRect(0, 0, w, h);
        g.setFill(Color.web("#c9d3dd"));
        g.setFont(Font.font(null, FontWeight.BOLD, 13));
        g.setTextAlign(TextAlignment.LEFT);
        g.setTextBaseline(VPos.TOP);
        String[] names = {"x", "y", "z"};
        g.fillText(String.format(Locale.ROOT, "%s  %s = %.1f mm", plane.title(), names[plane.fixedAxis()],
                vm.crosshair()[plane.fixedAxis()]), 4, 2);
        if (image == null) {
            g.setTextAlign(TextAlignment.CENTER);
            g.setTextBaseline(VPos.CENTER);
            g.fillText("no image", w / 2, h / 2);
            return;
        }
        SliceFrame f = image.frame();
        double availW = Math.max(1, w - 2 * MARGIN);
        double availH = Math.max(1, h - 2 * MARGIN);
        scale = Math.min(availW / f.width(), availH / f.height());
        originX = (w - f.width() * scale) / 2;
        originY = (h - f.height() * scale) / 2;
        g.setImageSmoothing(false);
        g.drawImage(fxImage, originX, originY, f.width() * scale, f.height() * scale);
        drawSideLabels(g, w, h);
        drawOverlays(g, f);
        drawCrosshair(g, f);
    }

    private void drawSideLabels(GraphicsContext g, double w, double h) {
        g.setFill(Color.web("#f2c14e"));
        g.setFont(Font.font(null, FontWeight.BOLD, 15));
        g.setTextBaseline(VPos.CENTER);
        g.setTextAlign(TextAlignment.CENTER);
        g.fillText(plane.leftLabel(), MARGIN / 2, h / 2);
        g.fillText(plane.rightLabel(), w - MARGIN / 2, h / 2);
        g.fillText(plane.topLabel(), w / 2, originY - MARGIN / 2 < 8 ? 10 : originY - MARGIN / 2);
        g.fillText(plane.bottomLabel(), w / 2, Math.min(h - 8, originY + image.frame().height() * scale + MARGIN / 2));
    }

    private void drawCrosshair(GraphicsContext g, SliceFrame f) {
        double[] c = screenOfWorld(vm.crosshair());
        g.setStroke(Color.web("#3fb950", 0.8));
        g.setLineWidth(1);
        g.setLineDashes(6, 4);
        double x0 = originX;
        double x1 = originX + f.width() * scale;
        double y0 = originY;
        double y1 = originY + f.height() * scale;
        g.strokeLine(x0, c[1], x1, c[1]);
        g.strokeLine(c[0], y0, c[0], y1);
        g.setLineDashes();
    }

    private void drawOverlays(GraphicsContext g, SliceFrame f) {
        Overlay.Posture posture = vm.posture();
        g.setFont(Font.font(null, FontWeight.NORMAL, 12));
        g.setTextAlign(TextAlignment.LEFT);
        g.setTextBaseline(VPos.BOTTOM);
        for (Overlay o : vm.overlays()) {
            if (o.posture() != posture) {
                continue;
            }
            Color color = colorOf(o.kind());
            g.setStroke(color);
            g.setFill(color);
            g.setLineWidth(1.6);
            if (o.ellipsoid() != null) {
                EllipseSection.Ellipse e = EllipseSection.section(o.centerRasMm(), o.ellipsoid().axes(),
                        o.ellipsoid().semiAxesMm(), plane, f.fixedMm());
                if (e != null) {
                    double[] uv = e.outline(ELLIPSE_POINTS);
                    double[] xs = new double[ELLIPSE_POINTS];
                    double[] ys = new double[ELLIPSE_POINTS];
                    for (int t = 0; t < ELLIPSE_POINTS; t++) {
                        xs[t] = originX + f.x(uv[2 * t]) * scale;
                        ys[t] = originY + f.y(uv[2 * t + 1]) * scale;
                    }
                    g.strokePolygon(xs, ys, ELLIPSE_POINTS);
                }
            }
            double[] s = screenOfWorld(o.centerRasMm());
            // Distance of the point from this slice: full marker on the slice, faded off it.
            double off = Math.abs(o.centerRasMm()[plane.fixedAxis()] - f.fixedMm());
            double alpha = off <= f.pixelMm() ? 1.0 : 0.45;
            g.setGlobalAlpha(alpha);
            double r = 5;
            g.strokeLine(s[0] - r, s[1], s[0] + r, s[1]);
            g.strokeLine(s[0], s[1] - r, s[0], s[1] + r);
            g.strokeOval(s[0] - r, s[1] - r, 2 * r, 2 * r);
            g.fillText(o.label(), s[0] + r + 2, s[1] - 2);
            g.setGlobalAlpha(1.0);
        }
    }

    /** Colour of each overlay kind (also used by the legend). */
    public static Color colorOf(Overlay.Kind kind) {
        return switch (kind) {
            case LESION_MARK -> Color.web("#ffd33d");
            case NIPPLE -> Color.web("#ff7eb6");
            case MECHANICS -> Color.web("#ff9f43");
            case HYBRID -> Color.web("#33d6ff");
            case REGISTRATION -> Color.web("#c792ea");
            case TRUTH -> Color.web("#7ee787");
        };
    }
}
