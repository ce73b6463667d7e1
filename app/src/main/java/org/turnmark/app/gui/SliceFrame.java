package org.turnmark.app.gui;

import org.turnmark.geom.Grid3;

/**
 * Where a rendered slice lies in the world: square pixels of {@code pixelMm} on a plane of constant
 * world coordinate, covering the image's world bounding box. Pixel (0, 0) is the top-left pixel;
 * pixel centres sit at half-integer pixel coordinates. Immutable.
 *
 * @param plane    which view
 * @param width    pixels across
 * @param height   pixels down
 * @param pixelMm  pixel edge in mm
 * @param leftMm   world coordinate (along {@code plane.horizontalAxis()}) of the left edge of the slice
 * @param topMm    world coordinate (along {@code plane.verticalAxis()}) of the top edge
 * @param fixedMm  world coordinate of the plane along {@code plane.fixedAxis()}
 */
public record SliceFrame(SlicePlane plane, int width, int height, double pixelMm, double leftMm, double topMm,
                         double fixedMm) {

    /** Longest side of a rendered slice in pixels; coarser pixels are used for larger fields of view. */
    public static final int MAX_PIXELS = 512;

    /**
     * The frame for {@code plane} through world point {@code crosshairRasMm}, covering the world
     * bounding box of the grid's voxels (centres ± half a voxel), pixels as fine as the finest voxel
     * spacing but at most {@link #MAX_PIXELS} across.
     */
    public static SliceFrame covering(Grid3 grid, SlicePlane plane, double[] crosshairRasMm) {
        double[] lo = {Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY};
        double[] hi = {Double.NEGATIVE_INFINITY, Double.NEGATIVE_INFINITY, Double.NEGATIVE_INFINITY};
        for (int c = 0; c < 8; c++) {
            double i = (c & 1) == 0 ? -0.5 : grid.nx() - 0.5;
            double j = (c & 2) == 0 ? -0.5 : grid.ny() - 0.5;
            double k = (c & 4) == 0 ? -0.5 : grid.nz() - 0.5;
            double[] w = grid.worldOf(i, j, k);
            for (int a = 0; a < 3; a++) {
                lo[a] = Math.min(lo[a], w[a]);
                hi[a] = Math.max(hi[a], w[a]);
            }
        }
        double[] sp = grid.spacingMm();
        double pixel = Math.min(sp[0], Math.min(sp[1], sp[2]));
        int h = plane.horizontalAxis();
        int v = plane.verticalAxis();
        double spanH = hi[h] - lo[h];
        double spanV = hi[v] - lo[v];
        pixel = Math.max(pixel, Math.max(spanH, spanV) / MAX_PIXELS);
        int width = Math.max(1, (int) Math.ceil(spanH / pixel - 1e-9));
        int height = Math.max(1, (int) Math.ceil(spanV / pixel - 1e-9));
        double left = plane.rightSign() > 0 ? lo[h] : hi[h];
        return new SliceFrame(plane, width, height, pixel, left, hi[v], crosshairRasMm[plane.fixedAxis()]);
    }

    /** World coordinate along the horizontal axis at screen x (pixel units, 0 = left edge). */
    public double horizontalMm(double x) {
        return leftMm + plane.rightSign() * x * pixelMm;
    }

    /** World coordinate along the vertical axis at screen y (pixel units, 0 = top edge). */
    public double verticalMm(double y) {
        return topMm - y * pixelMm;
    }

    /** Screen x (pixel units) of a world coordinate along the horizontal axis. */
    public double x(double horizontalMm) {
        return (horizontalMm - leftMm) * plane.rightSign() / pixelMm;
    }

    /** Screen y (pixel units) of a world coordinate along the vertical axis. */
    public double y(double verticalMm) {
        return (topMm - verticalMm) / pixelMm;
    }

    /** The world point (RAS mm, new array) under screen point (x, y) on this plane. */
    public double[] worldAt(double x, double y) {
        double[] w = new double[3];
        w[plane.fixedAxis()] = fixedMm;
        w[plane.horizontalAxis()] = horizontalMm(x);
        w[plane.verticalAxis()] = verticalMm(y);
        return w;
    }

    /** Screen position {x, y} (pixel units, new array) of the projection of a world point onto this plane. */
    public double[] screenOf(double[] rasMm) {
        return new double[] {x(rasMm[plane.horizontalAxis()]), y(rasMm[plane.verticalAxis()])};
    }
}
