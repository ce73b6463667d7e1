package org.turnmark.registration.diffeo;

import java.util.Locale;

import org.turnmark.geom.Grid3;
import org.turnmark.registration.transform.DisplacementFields;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * The images to register. Validated on construction: finite voxels, masks on their image's grid and
 * not empty, the initial field on the fixed grid with finite components. The moving image may be on
 * any grid (it is sampled through world coordinates).
 *
 * @param fixed        fixed (reference) image; the result lives on its grid
 * @param moving       moving image
 * @param fixedMask    optional (null): voxels &gt; 0.5 are tissue on the fixed grid
 * @param movingMask   optional (null): voxels &gt; 0.5 are tissue on the moving grid
 * @param initial      optional (null) initial displacement on the fixed grid, same convention as
 *                     {@link RegistrationResult#displacement()}; residual mode refines it
 * @param fixedName    name of the fixed image in messages (e.g. its file name)
 * @param movingName   name of the moving image in messages
 */
public record RegistrationInput(Volume fixed, Volume moving, Volume fixedMask, Volume movingMask,
                                VectorField initial, String fixedName, String movingName) {

    public RegistrationInput {
        if (fixed == null || moving == null) {
            throw new IllegalArgumentException("fixed and moving images must be given");
        }
        fixedName = fixedName == null ? "fixed image" : fixedName;
        movingName = movingName == null ? "moving image" : movingName;
        requireFinite(fixed, fixedName);
        requireFinite(moving, movingName);
        if (fixedMask != null) {
            requireMask(fixedMask, fixed.grid(), "fixed mask");
        }
        if (movingMask != null) {
            requireMask(movingMask, moving.grid(), "moving mask");
        }
        if (initial != null) {
            if (!initial.grid().sameGrid(fixed.grid(), DisplacementFields.GRID_TOLERANCE_MM)) {
                throw new IllegalArgumentException("initial displacement field must be on the fixed grid " + fixed.grid()
                        + " (" + fixedName + "), got " + initial.grid()
                        + "; resample it first (DisplacementFields.resample)");
            }
            DisplacementFields.requireFinite(initial, "initial displacement field");
        }
    }

    /** Input without masks or initial field. */
    public static RegistrationInput of(Volume fixed, Volume moving) {
        return new RegistrationInput(fixed, moving, null, null, null, null, null);
    }

    private static void requireFinite(Volume v, String what) {
        float[] d = v.data();
        Grid3 g = v.grid();
        for (int n = 0; n < d.length; n++) {
            if (!Float.isFinite(d[n])) {
                throw new IllegalArgumentException(String.format(Locale.ROOT,
                        "%s: voxel (%d, %d, %d) must be finite, got %s", what, n % g.nx(), (n / g.nx()) % g.ny(),
                        n / (g.nx() * g.ny()), d[n]));
            }
        }
    }

    private static void requireMask(Volume m, Grid3 g, String what) {
        if (!m.grid().sameGrid(g, DisplacementFields.GRID_TOLERANCE_MM)) {
            throw new IllegalArgumentException(what + " must be on its image's grid " + g + ", got " + m.grid());
        }
        for (float x : m.data()) {
            if (x > 0.5f) {
                return;
            }
        }
        throw new IllegalArgumentException(what + " is empty (expected at least one voxel > 0.5)");
    }
}
