package org.turnmark.registration.diffeo;

/** Optional global alignment found before the deformable stage. */
public enum PreAlignment {
    /** No global alignment (the initial field, if any, is trusted for the bulk motion). */
    NONE,
    /** Translation only: centres of mass, then refined on the similarity. */
    TRANSLATION,
    /** Rotation and translation (6 parameters). */
    RIGID,
    /** General affine (12 parameters). */
    AFFINE
}
