package org.turnmark.app.gui;

/**
 * One position for the results table, already formatted with units.
 *
 * @param lesion      lesion id
 * @param method      "mechanics-only", "hybrid", "registration-only", or the prone centroid
 * @param frame       the image frame of the position, in words
 * @param positionRas e.g. "(−70.2, 40.1, 18.3) mm"
 * @param semiAxes95  95 % ellipsoid semi-axes, e.g. "6.1, 3.9, 2.2 mm", or a dash without uncertainty
 * @param descriptors side, clock face, quadrant, depth third, distance from the nipple in cm
 */
public record ResultRow(String lesion, String method, String frame, String positionRas, String semiAxes95,
                        String descriptors) {
}
