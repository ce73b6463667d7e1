package org.turnmark.app.phantom;

import org.turnmark.geom.Progress;

/**
 * The small case shared by the phantom tests (generated once per test JVM): the options of the
 * bundled case {@code sample-cases/phantom-small}, 4 mm voxels and 8 mm elements so that the truth
 * solves stay short.
 */
final class PhantomFixture {

    /** Options of {@code sample-cases/phantom-small} (see its README for the command). */
    static final PhantomOptions SMALL = new PhantomOptions(3, 4.0, 1, "right", 350, 0.85, 0.3, 12, 1,
            PhantomOptions.Contrast.T1, 25, 8.0);

    private static PhantomCase small;

    private PhantomFixture() {
    }

    static synchronized PhantomCase small() {
        if (small == null) {
            small = PhantomGenerator.generate(SMALL, Progress.NONE);
        }
        return small;
    }

    static TruthMechanics truth() {
        return small().truth();
    }
}
