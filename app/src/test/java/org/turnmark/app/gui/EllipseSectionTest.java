package org.turnmark.app.gui;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;

import org.junit.jupiter.api.Test;

/** Sections of ellipsoids by axis-aligned planes, against closed forms and the defining quadric. */
class EllipseSectionTest {

    /** Closed-form radii and quadric values are reproduced to a few ulps of mm-sized numbers. */
    private static final double TOL = 1e-9;

    private static final double[][] IDENTITY = {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}};

    @Test
    void sphereCutOffCentreIsACircleOfRadiusSqrtRSquaredMinusDSquared() {
        // Closed form: a sphere of radius R cut at distance d from its centre gives radius √(R² − d²).
        double r = 10;
        double d = 6;
        double[] c = {1, 2, 3};
        EllipseSection.Ellipse e = EllipseSection.section(c, IDENTITY, new double[] {r, r, r}, SlicePlane.AXIAL,
                c[2] + d);
        assertNotNull(e);
        assertEquals(8.0, e.semiAxis1(), TOL);
        assertEquals(8.0, e.semiAxis2(), TOL);
        assertEquals(1.0, e.centerU(), TOL);
        assertEquals(2.0, e.centerV(), TOL);
    }

    @Test
    void centralSectionOfAnAxisAlignedEllipsoidKeepsTheInPlaneSemiAxes() {
        double[] c = {0, 0, 0};
        EllipseSection.Ellipse e = EllipseSection.section(c, IDENTITY, new double[] {9, 6, 4}, SlicePlane.CORONAL, 0);
        // Coronal: horizontal = x (semi-axis 9), vertical = z (semi-axis 4).
        double a = Math.max(e.semiAxis1(), e.semiAxis2());
        double b = Math.min(e.semiAxis1(), e.semiAxis2());
        assertEquals(9, a, TOL);
        assertEquals(4, b, TOL);
    }

    @Test
    void outlineOfARotatedEllipsoidLiesOnItsSurface() {
        // Definition: the ellipsoid is (x − c)ᵀ A (x − c) = 1 with A = Σ vᵢvᵢᵀ / sᵢ².
        double s2 = Math.sqrt(0.5);
        double s3 = Math.sqrt(1.0 / 3);
        double s6 = Math.sqrt(1.0 / 6);
        double[][] axes = {{s3, s3, s3}, {s2, -s2, 0}, {s6, s6, -2 * s6}};
        double[] semi = {12, 7, 3};
        double[] c = {-30, 20, 5};
        for (SlicePlane plane : SlicePlane.values()) {
            double fixed = c[plane.fixedAxis()] + 2.5;
            EllipseSection.Ellipse e = EllipseSection.section(c, axes, semi, plane, fixed);
            assertNotNull(e, plane.toString());
            double[] uv = e.outline(36);
            for (int t = 0; t < 36; t++) {
                double[] x = new double[3];
                x[plane.fixedAxis()] = fixed;
                x[plane.horizontalAxis()] = uv[2 * t];
                x[plane.verticalAxis()] = uv[2 * t + 1];
                double q = 0;
                for (int i = 0; i < 3; i++) {
                    double proj = 0;
                    for (int a = 0; a < 3; a++) {
                        proj += axes[i][a] * (x[a] - c[a]);
                    }
                    q += proj * proj / (semi[i] * semi[i]);
                }
                assertEquals(1.0, q, TOL, plane + " point " + t);
            }
        }
    }

    @Test
    void aPlaneBeyondTheEllipsoidGivesNoSection() {
        assertNull(EllipseSection.section(new double[] {0, 0, 0}, IDENTITY, new double[] {3, 3, 3},
                SlicePlane.SAGITTAL, 3.5));
    }
}
