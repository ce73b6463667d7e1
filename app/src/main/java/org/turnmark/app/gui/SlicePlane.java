package org.turnmark.app.gui;

/**
 * The three orthogonal views and how world (RAS+) axes map to the screen. Screen sides are named by
 * patient direction (REFERENCE §2: +x Right, +y Anterior, +z Superior), so the display convention
 * never has to be guessed: axial and coronal views show the patient's right on the screen's left
 * (as if facing the patient), the sagittal view shows anterior on the left.
 */
public enum SlicePlane {
    /** Through a fixed z (superior–inferior); screen right = patient left (−x), screen up = anterior (+y). */
    AXIAL("Axial", 2, 0, -1, 1, "R", "L", "A", "P"),
    /** Through a fixed x (right–left); screen right = posterior (−y), screen up = superior (+z). */
    SAGITTAL("Sagittal", 0, 1, -1, 2, "A", "P", "S", "I"),
    /** Through a fixed y (anterior–posterior); screen right = patient left (−x), screen up = superior (+z). */
    CORONAL("Coronal", 1, 0, -1, 2, "R", "L", "S", "I");

    private final String title;
    private final int fixedAxis;
    private final int horizontalAxis;
    private final int rightSign;
    private final int verticalAxis;
    private final String leftLabel;
    private final String rightLabel;
    private final String topLabel;
    private final String bottomLabel;

    SlicePlane(String title, int fixedAxis, int horizontalAxis, int rightSign, int verticalAxis,
               String leftLabel, String rightLabel, String topLabel, String bottomLabel) {
        this.title = title;
        this.fixedAxis = fixedAxis;
        this.horizontalAxis = horizontalAxis;
        this.rightSign = rightSign;
        this.verticalAxis = verticalAxis;
        this.leftLabel = leftLabel;
        this.rightLabel = rightLabel;
        this.topLabel = topLabel;
        this.bottomLabel = bottomLabel;
    }

    /** "Axial", "Sagittal" or "Coronal". */
    public String title() {
        return title;
    }

    /** World axis (0 x, 1 y, 2 z) held fixed at the crosshair. */
    public int fixedAxis() {
        return fixedAxis;
    }

    /** World axis shown left–right on screen. */
    public int horizontalAxis() {
        return horizontalAxis;
    }

    /** +1 if the world coordinate grows towards the screen's right, −1 if it shrinks. */
    public int rightSign() {
        return rightSign;
    }

    /** World axis shown bottom–top on screen; it always grows upwards (A or S at the top). */
    public int verticalAxis() {
        return verticalAxis;
    }

    /** Patient direction at the screen's left edge. */
    public String leftLabel() {
        return leftLabel;
    }

    public String rightLabel() {
        return rightLabel;
    }

    public String topLabel() {
        return topLabel;
    }

    public String bottomLabel() {
        return bottomLabel;
    }
}
