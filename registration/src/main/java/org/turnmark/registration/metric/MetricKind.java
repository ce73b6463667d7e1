package org.turnmark.registration.metric;

/** The similarity measures available to the registration. */
public enum MetricKind {
    /** Mean of squared intensity differences; same contrast and scale in both images. */
    SSD,
    /** Local normalised cross-correlation in a window given in mm (Avants et al., Med Image Anal 2008). */
    LNCC,
    /** Mattes-style mutual information with B-spline Parzen windows (Mattes et al., IEEE TMI 2003). */
    MI
}
