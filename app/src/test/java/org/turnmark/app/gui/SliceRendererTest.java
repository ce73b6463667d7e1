package org.turnmark.app.gui;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.Volume;

/**
 * Screen sides must show the patient directions their labels claim. Reference: NIfTI world is RAS+
 * (+x patient right, +y anterior, +z superior; nifti1.h, REFERENCE §2); the label layout is the one
 * documented in {@link SlicePlane}.
 */
class SliceRendererTest {

    /** Pixel ↔ world round trips are exact up to a few ulps of coordinates of order 100 mm. */
    private static final double ROUND_TRIP_MM = 1e-9;

    private static final DisplayWindow WINDOW = new DisplayWindow(50, 100);

    /** A 5 × 4 × 3 grid of 2 mm voxels, i growing towards patient LEFT (x flipped, as in LPS-stored data). */
    private static Grid3 flippedGrid() {
        return new Grid3(5, 4, 3, new Affine3D(-2, 0, 0, 4, 0, 2, 0, -3, 0, 0, 2, -2));
    }

    private static int grayAt(SliceRenderer.Image img, int x, int y) {
        return img.argb()[y * img.frame().width() + x] & 0xFF;
    }

    @Test
    void patientRightShowsOnTheScreenLeftOfAxialAndCoronalViews() {
        Grid3 g = flippedGrid();
        float[] d = new float[g.size()];
        // Voxel column i = 0 is the most patient-right one: x = +4 mm.
        for (int k = 0; k < 3; k++) {
            for (int j = 0; j < 4; j++) {
                d[g.index(0, j, k)] = 100;
            }
        }
        Volume v = new Volume(g, d);
        double[] centre = g.worldOf(2, 1.5, 1);
        for (SlicePlane p : new SlicePlane[] {SlicePlane.AXIAL, SlicePlane.CORONAL}) {
            SliceRenderer.Image img = SliceRenderer.render(v, p, centre, WINDOW);
            assertEquals("R", p.leftLabel());
            assertEquals(5, img.frame().width(), "one 2 mm pixel per voxel across x");
            assertEquals(255, grayAt(img, 0, 1), p + ": leftmost column must be the patient-right voxels");
            assertEquals(0, grayAt(img, 4, 1), p + ": rightmost column must be patient left");
        }
    }

    @Test
    void anteriorIsUpInAxialAndLeftInSagittalSuperiorIsUpInCoronal() {
        Grid3 g = flippedGrid();
        float[] d = new float[g.size()];
        for (int k = 0; k < 3; k++) {
            for (int i = 0; i < 5; i++) {
                d[g.index(i, 3, k)] = 100; // most anterior row (largest y)
            }
        }
        Volume ant = new Volume(g, d);
        double[] centre = g.worldOf(2, 1.5, 1);
        SliceRenderer.Image axial = SliceRenderer.render(ant, SlicePlane.AXIAL, centre, WINDOW);
        assertEquals("A", SlicePlane.AXIAL.topLabel());
        assertEquals(255, grayAt(axial, 2, 0));
        assertEquals(0, grayAt(axial, 2, axial.frame().height() - 1));
        SliceRenderer.Image sag = SliceRenderer.render(ant, SlicePlane.SAGITTAL, centre, WINDOW);
        assertEquals("A", SlicePlane.SAGITTAL.leftLabel());
        assertEquals(255, grayAt(sag, 0, 1));
        assertEquals(0, grayAt(sag, sag.frame().width() - 1, 1));

        float[] s = new float[g.size()];
        for (int j = 0; j < 4; j++) {
            for (int i = 0; i < 5; i++) {
                s[g.index(i, j, 2)] = 100; // most superior slab
            }
        }
        SliceRenderer.Image cor = SliceRenderer.render(new Volume(g, s), SlicePlane.CORONAL, centre, WINDOW);
        assertEquals("S", SlicePlane.CORONAL.topLabel());
        assertEquals(255, grayAt(cor, 2, 0));
        assertEquals(0, grayAt(cor, 2, cor.frame().height() - 1));
    }

    @Test
    void pixelsOnVoxelCentresShowTheVoxelValuesExactly() {
        // Axis-aligned, pixel = voxel: every pixel centre is a voxel centre, so trilinear sampling
        // returns the stored value (closed form) and the grey is the window's mapping of it.
        Grid3 g = flippedGrid();
        float[] d = new float[g.size()];
        for (int q = 0; q < d.length; q++) {
            d[q] = (q * 7) % 101;
        }
        Volume v = new Volume(g, d);
        double[] p = g.worldOf(0, 0, 1);
        SliceRenderer.Image img = SliceRenderer.render(v, SlicePlane.AXIAL, p, WINDOW);
        SliceFrame f = img.frame();
        for (int y = 0; y < f.height(); y++) {
            for (int x = 0; x < f.width(); x++) {
                double[] w = f.worldAt(x + 0.5, y + 0.5);
                double[] ijk = g.worldToVoxel().applyPoint(w[0], w[1], w[2]);
                int i = (int) Math.round(ijk[0]);
                int j = (int) Math.round(ijk[1]);
                assertEquals(WINDOW.gray(v.get(i, j, 1)), grayAt(img, x, y), "pixel " + x + "," + y);
            }
        }
    }

    @Test
    void pointsOutsideTheImageShowTheOutsideColour() {
        Grid3 g = flippedGrid();
        Volume v = new Volume(g, new float[g.size()]);
        // Plane 10 mm above the top slab (z centres −2, 0, 2 mm; box ends at 3 mm).
        SliceRenderer.Image img = SliceRenderer.render(v, SlicePlane.AXIAL, new double[] {0, 0, 12}, WINDOW);
        for (int c : img.argb()) {
            assertEquals(SliceRenderer.OUTSIDE_ARGB, c);
        }
    }

    @Test
    void screenAndWorldRoundTripOnEveryPlane() {
        Grid3 g = new Grid3(30, 20, 10, Affine3D.rotation(0.2, 1, 0.3, 0.4).compose(Affine3D.scaling(1.5, 2, 3)));
        double[] p = g.worldOf(11.3, 7.2, 4.9);
        for (SlicePlane plane : SlicePlane.values()) {
            SliceFrame f = SliceFrame.covering(g, plane, p);
            double[] s = f.screenOf(p);
            assertArrayEquals(p, f.worldAt(s[0], s[1]), ROUND_TRIP_MM, plane.toString());
            assertEquals(p[plane.fixedAxis()], f.fixedMm(), 0.0);
        }
    }
}
