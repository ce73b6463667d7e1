package org.turnmark.app.gui;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.resample.Interpolation;
import org.turnmark.registration.resample.Outside;
import org.turnmark.registration.volume.Volume;

/**
 * Renders one orthogonal world-aligned slice of a volume into ARGB pixels: each pixel centre is
 * mapped to continuous voxel coordinates through the image's world→voxel affine and sampled
 * trilinearly, so any voxel orientation (including oblique and flipped axes) shows the patient the
 * right way round. Points more than half a voxel outside the image show {@link #OUTSIDE_ARGB}.
 * Stateless and thread safe; plain Java (no JavaFX).
 */
public final class SliceRenderer {

    /** Colour of pixels outside the image (dark slate, distinct from black tissue-free air). */
    public static final int OUTSIDE_ARGB = 0xFF1E2630;

    private SliceRenderer() {
    }

    /** A rendered slice: its world placement and {@code width × height} ARGB pixels, row by row from the top. */
    public record Image(SliceFrame frame, int[] argb) {
    }

    /**
     * Renders the slice of {@code volume} in {@code plane} through {@code crosshairRasMm}.
     *
     * @param volume         the image; not modified
     * @param plane          which orthogonal view
     * @param crosshairRasMm world point (RAS mm) the plane passes through; not modified
     * @param window         grey mapping
     * @return a new image
     */
    public static Image render(Volume volume, SlicePlane plane, double[] crosshairRasMm, DisplayWindow window) {
        Grid3 g = volume.grid();
        SliceFrame f = SliceFrame.covering(g, plane, crosshairRasMm);
        int w = f.width();
        int h = f.height();
        int[] out = new int[w * h];
        Affine3D toVoxel = g.worldToVoxel();
        float[] data = volume.data();
        int nx = g.nx();
        int ny = g.ny();
        int nz = g.nz();
        double[] p = new double[3];
        double[] ijk = new double[3];
        int ha = plane.horizontalAxis();
        int va = plane.verticalAxis();
        p[plane.fixedAxis()] = f.fixedMm();
        for (int y = 0; y < h; y++) {
            p[va] = f.verticalMm(y + 0.5);
            int row = y * w;
            for (int x = 0; x < w; x++) {
                p[ha] = f.horizontalMm(x + 0.5);
                toVoxel.applyPoint(p, ijk);
                double i = ijk[0];
                double j = ijk[1];
                double k = ijk[2];
                if (i < -0.5 || j < -0.5 || k < -0.5 || i > nx - 0.5 || j > ny - 0.5 || k > nz - 0.5) {
                    out[row + x] = OUTSIDE_ARGB;
                    continue;
                }
                // Within half a voxel of the box of centres: CLAMP gives the edge voxel's value there.
                double v = Interpolation.linear(data, nx, ny, nz, i, j, k, Outside.CLAMP, 0);
                int gray = window.gray(v);
                out[row + x] = 0xFF000000 | (gray << 16) | (gray << 8) | gray;
            }
        }
        return new Image(f, out);
    }
}
