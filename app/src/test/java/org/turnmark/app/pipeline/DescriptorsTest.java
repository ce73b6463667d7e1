package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.junit.jupiter.api.Test;

/**
 * Hand-computed cases. Conventions (common practice; REFERENCE §3 secondary teaching sources): clock
 * face as seen facing the patient, 12 superior, lateral 9 o'clock in the right breast and 3 o'clock
 * in the left; depth thirds along nipple → chest wall.
 */
class DescriptorsTest {

    private static final double[] NIPPLE_R = {80, 100, 0};
    private static final double[] NIPPLE_L = {-80, 100, 0};
    private static final double[] WALL_R = {80, 40, 0};
    private static final double[] WALL_L = {-80, 40, 0};

    private static Descriptors.Descriptor right(double dx, double dy, double dz) {
        return Descriptors.compute("right", new double[] {80 + dx, 100 + dy, dz}, NIPPLE_R, WALL_R, 10, 20.0);
    }

    private static Descriptors.Descriptor left(double dx, double dy, double dz) {
        return Descriptors.compute("left", new double[] {-80 + dx, 100 + dy, dz}, NIPPLE_L, WALL_L, 10, 20.0);
    }

    @Test
    void lateralIsNineOClockRightAndThreeOClockLeft() {
        // Right breast, lesion 40 mm toward the patient's right (+x, lateral): 9 o'clock.
        assertEquals("9:00", right(40, -20, 0).clock());
        assertEquals("lower-outer", right(40, -20, -0.001).quadrant());
        // Left breast, lesion 40 mm toward the patient's left (−x, lateral): 3 o'clock.
        assertEquals("3:00", left(-40, -20, 0).clock());
    }

    @Test
    void superiorIsTwelveAndInferiorSixInBothBreasts() {
        assertEquals("12:00", right(0, -10, 30).clock());
        assertEquals("12:00", left(0, -10, 30).clock());
        assertEquals("6:00", right(0, -10, -30).clock());
        assertEquals("6:00", left(0, -10, -30).clock());
    }

    @Test
    void mirrorImagePositionsGetMirroredClockAndTheSameQuadrant() {
        // Upper-outer: right breast superolateral (+x, +z) is 10:30; its mirror in the left (−x, +z) is 1:30.
        Descriptors.Descriptor r = right(30, -20, 30);
        Descriptors.Descriptor l = left(-30, -20, 30);
        assertEquals("10:30", r.clock());
        assertEquals("1:30", l.clock());
        assertEquals("upper-outer", r.quadrant());
        assertEquals("upper-outer", l.quadrant());
        // Upper-inner (toward the midline): right −x is 1:30, left +x is 10:30.
        assertEquals("1:30", right(-30, -20, 30).clock());
        assertEquals("upper-inner", right(-30, -20, 30).quadrant());
        assertEquals("10:30", left(30, -20, 30).clock());
        assertEquals("upper-inner", left(30, -20, 30).quadrant());
        assertEquals("lower-inner", left(30, -20, -30).quadrant());
    }

    @Test
    void twoOClockLeftIsSixtyDegreesClockwiseFromTwelve() {
        // 60° clockwise from 12 seen facing the patient: dz = cos 60°, observer-right (−x) = sin 60°.
        double r = 40;
        Descriptors.Descriptor d = left(-r * Math.sin(Math.toRadians(60)), -10, r * Math.cos(Math.toRadians(60)));
        assertEquals(2.0, d.clockHour(), 0.0);
        assertEquals("2:00", d.clock());
    }

    @Test
    void nearTheNippleIsCentralAndFarSuperolateralIsAxillaryTail() {
        assertEquals("central/retroareolar", right(5, -15, 5).quadrant());
        assertEquals("axillary tail", right(60, -30, 60).quadrant());
        assertEquals("axillary tail", left(-60, -30, 60).quadrant());
    }

    @Test
    void axillaryTailIsTheUpperOuterSectorAboveHalfTheLateralOffsetBeyondSeventyMm() {
        // Hand-computed against the class doc: upper-outer, coronal distance > 70 mm, dz > lateral / 2.
        // lateral 80, dz 41 > 40: coronal √(80² + 41²) ≈ 89.9 mm → tail; dz 39 < 40 → upper-outer.
        assertEquals("axillary tail", right(80, -30, 41).quadrant());
        assertEquals("upper-outer", right(80, -30, 39).quadrant());
        assertEquals("axillary tail", left(-80, -30, 41).quadrant());
        assertEquals("upper-outer", left(-80, -30, 39).quadrant());
        // Straight superior (12 o'clock) beyond 70 mm is inside the sector.
        assertEquals("axillary tail", right(0, -30, 80).quadrant());
        assertEquals("axillary tail", left(0, -30, 80).quadrant());
        // Inside the sector but √(50² + 48²) ≈ 69.3 mm ≤ 70 mm from the nipple: upper-outer.
        assertEquals("upper-outer", right(50, -30, 48).quadrant());
        // Upper-inner at the same distance is never the tail.
        assertEquals("upper-inner", right(-60, -30, 60).quadrant());
    }

    @Test
    void depthThirdsAndDistance() {
        // Nipple at y = 100, chest wall at y = 40: 60 mm; thirds at 20 and 40 mm behind the nipple.
        assertEquals("anterior", right(0, -10, 25).depthThird());
        assertEquals("middle", right(0, -30, 25).depthThird());
        assertEquals("posterior", right(0, -50, 25).depthThird());
        assertEquals(0.5, right(0, -30, 25).depthFraction(), 1e-12);
        // 3-4-5 triangle ×10 mm: 5.0 cm.
        assertEquals(5.0, right(0, -30, 40).distanceFromNippleCm(), 1e-12);
    }

    @Test
    void depthFromChestWallIsKeptUnknownWithoutAChestWallAndClampedAtZeroOtherwise() {
        Descriptors.Descriptor none = Descriptors.compute("right", new double[] {80, 70, 25}, NIPPLE_R, WALL_R, 10,
                null);
        assertNull(none.depthFromChestWallMm(), "no chest-wall surface: unknown, not 0 mm");
        assertEquals(0.0, Descriptors.compute("right", new double[] {80, 70, 25}, NIPPLE_R, WALL_R, 10, -0.5)
                .depthFromChestWallMm(), 0.0);
    }

    @Test
    void unknownSideIsRejected() {
        assertThrows(IllegalArgumentException.class,
                () -> Descriptors.compute("both", new double[3], NIPPLE_R, WALL_R, 0, 0.0));
    }
}
