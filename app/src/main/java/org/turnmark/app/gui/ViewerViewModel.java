package org.turnmark.app.gui;

import java.util.Locale;

import javafx.beans.property.DoubleProperty;
import javafx.beans.property.ObjectProperty;
import javafx.beans.property.ReadOnlyStringProperty;
import javafx.beans.property.ReadOnlyStringWrapper;
import javafx.beans.property.SimpleDoubleProperty;
import javafx.beans.property.SimpleObjectProperty;
import javafx.collections.FXCollections;
import javafx.collections.ObservableList;

import org.turnmark.geom.Grid3;
import org.turnmark.registration.resample.Interpolation;
import org.turnmark.registration.resample.Outside;
import org.turnmark.registration.volume.Volume;

/**
 * State of the three-view slice viewer: the image shown, the crosshair (world RAS mm) whose three
 * orthogonal planes are displayed, the grey window, and the overlays (marks, predictions,
 * ellipsoids). Properties only, no scene graph; to be used on the JavaFX application thread.
 */
public final class ViewerViewModel {

    private final ObjectProperty<Volume> volume = new SimpleObjectProperty<>(this, "volume");
    private final ObjectProperty<ImageChoice> image = new SimpleObjectProperty<>(this, "image");
    private final DoubleProperty crosshairX = new SimpleDoubleProperty(this, "crosshairX");
    private final DoubleProperty crosshairY = new SimpleDoubleProperty(this, "crosshairY");
    private final DoubleProperty crosshairZ = new SimpleDoubleProperty(this, "crosshairZ");
    private final DoubleProperty windowCenter = new SimpleDoubleProperty(this, "windowCenter", 0.5);
    private final DoubleProperty windowWidth = new SimpleDoubleProperty(this, "windowWidth", 1);
    private final DoubleProperty valueMin = new SimpleDoubleProperty(this, "valueMin", 0);
    private final DoubleProperty valueMax = new SimpleDoubleProperty(this, "valueMax", 1);
    private final ReadOnlyStringWrapper crosshairText = new ReadOnlyStringWrapper(this, "crosshairText", "");
    private final ObservableList<Overlay> overlays = FXCollections.observableArrayList();

    public ViewerViewModel() {
        crosshairX.addListener((o, a, b) -> updateText());
        crosshairY.addListener((o, a, b) -> updateText());
        crosshairZ.addListener((o, a, b) -> updateText());
        volume.addListener((o, a, b) -> updateText());
        windowWidth.addListener((o, a, b) -> {
            if (!(b.doubleValue() >= DisplayWindow.MIN_WIDTH)) {
                windowWidth.set(DisplayWindow.MIN_WIDTH);
            }
        });
    }

    /**
     * Shows a newly loaded image: the crosshair stays where it is if it lies inside the image,
     * otherwise it moves to the image centre; the grey window is reset to the 1–99 % range.
     */
    public void show(ImageChoice choice, Volume v) {
        float lo = Float.POSITIVE_INFINITY;
        float hi = Float.NEGATIVE_INFINITY;
        for (float x : v.data()) {
            if (x < lo) {
                lo = x;
            }
            if (x > hi) {
                hi = x;
            }
        }
        // NaN voxels fail both comparisons; an all-NaN image keeps a unit range.
        valueMin.set(lo <= hi ? lo : 0);
        valueMax.set(lo < hi ? hi : (lo <= hi ? lo + 1 : 1));
        image.set(choice);
        volume.set(v);
        if (!contains(v.grid(), crosshair())) {
            Grid3 g = v.grid();
            moveCrosshair(g.worldOf((g.nx() - 1) / 2.0, (g.ny() - 1) / 2.0, (g.nz() - 1) / 2.0));
        }
        resetWindow();
        updateText();
    }

    /** Clears the image and overlays. */
    public void clear() {
        image.set(null);
        volume.set(null);
        overlays.clear();
    }

    /** Sets the grey window to the 1st–99th percentile of the shown image. */
    public void resetWindow() {
        Volume v = volume.get();
        if (v != null) {
            DisplayWindow w = DisplayWindow.auto(v);
            windowWidth.set(w.width());
            windowCenter.set(w.center());
        }
    }

    /** Moves the crosshair to a world point (RAS mm); non-finite input is ignored. */
    public void moveCrosshair(double[] rasMm) {
        if (rasMm.length != 3 || !Double.isFinite(rasMm[0]) || !Double.isFinite(rasMm[1])
                || !Double.isFinite(rasMm[2])) {
            return;
        }
        crosshairX.set(rasMm[0]);
        crosshairY.set(rasMm[1]);
        crosshairZ.set(rasMm[2]);
    }

    /** The crosshair (RAS mm) as a new array. */
    public double[] crosshair() {
        return new double[] {crosshairX.get(), crosshairY.get(), crosshairZ.get()};
    }

    /** The current grey mapping. */
    public DisplayWindow window() {
        return new DisplayWindow(windowCenter.get(), Math.max(DisplayWindow.MIN_WIDTH, windowWidth.get()));
    }

    /** The slice in {@code plane} through the crosshair, or null without an image. Plain pixels, no scene graph. */
    public SliceRenderer.Image render(SlicePlane plane) {
        Volume v = volume.get();
        return v == null ? null : SliceRenderer.render(v, plane, crosshair(), window());
    }

    /** The posture of the displayed image, or null. */
    public Overlay.Posture posture() {
        ImageChoice c = image.get();
        return c == null ? null : c.posture();
    }

    /** True if the world point lies within the image's voxel box (centres ± half a voxel). */
    public static boolean contains(Grid3 g, double[] rasMm) {
        double[] ijk = g.worldToVoxel().applyPoint(rasMm[0], rasMm[1], rasMm[2]);
        return ijk[0] >= -0.5 && ijk[1] >= -0.5 && ijk[2] >= -0.5
                && ijk[0] <= g.nx() - 0.5 && ijk[1] <= g.ny() - 0.5 && ijk[2] <= g.nz() - 0.5;
    }

    private void updateText() {
        double[] p = crosshair();
        StringBuilder sb = new StringBuilder(String.format(Locale.ROOT, "crosshair RAS (%.1f, %.1f, %.1f) mm",
                p[0], p[1], p[2]));
        Volume v = volume.get();
        if (v != null) {
            Grid3 g = v.grid();
            double[] ijk = g.worldToVoxel().applyPoint(p[0], p[1], p[2]);
            if (contains(g, p)) {
                double value = Interpolation.linear(v.data(), g.nx(), g.ny(), g.nz(), ijk[0], ijk[1], ijk[2],
                        Outside.CLAMP, 0);
                sb.append(String.format(Locale.ROOT, "  ·  voxel (%.1f, %.1f, %.1f)  ·  value %.4g",
                        ijk[0], ijk[1], ijk[2], value));
            } else {
                sb.append("  ·  outside the image");
            }
        }
        crosshairText.set(sb.toString());
    }

    public ObjectProperty<Volume> volumeProperty() {
        return volume;
    }

    public ObjectProperty<ImageChoice> imageProperty() {
        return image;
    }

    public DoubleProperty crosshairXProperty() {
        return crosshairX;
    }

    public DoubleProperty crosshairYProperty() {
        return crosshairY;
    }

    public DoubleProperty crosshairZProperty() {
        return crosshairZ;
    }

    public DoubleProperty windowCenterProperty() {
        return windowCenter;
    }

    public DoubleProperty windowWidthProperty() {
        return windowWidth;
    }

    /** Smallest voxel value of the shown image (for window controls). */
    public DoubleProperty valueMinProperty() {
        return valueMin;
    }

    /** Largest voxel value of the shown image. */
    public DoubleProperty valueMaxProperty() {
        return valueMax;
    }

    /** "crosshair RAS (x, y, z) mm · voxel (i, j, k) · value v", updated as the crosshair moves. */
    public ReadOnlyStringProperty crosshairTextProperty() {
        return crosshairText.getReadOnlyProperty();
    }

    /** Everything drawn over the slices; the view draws those whose posture matches {@link #posture()}. */
    public ObservableList<Overlay> overlays() {
        return overlays;
    }
}
