package org.turnmark.registration.nifti;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

import org.turnmark.registration.volume.Volume;

/**
 * A scalar volume read from a NIfTI-1 file, with its header.
 *
 * @param header          the validated header (geometry, transform source, header warnings)
 * @param volume          one 3-D frame, values after {@code scl_slope}/{@code scl_inter} scaling
 * @param frame           the frame read (0-based index along {@code dim[4]})
 * @param nonFiniteVoxels voxels that are NaN or infinite (kept as stored, never replaced)
 */
public record NiftiVolume(NiftiHeader header, Volume volume, int frame, long nonFiniteVoxels) {

    /** Header warnings plus a note on non-finite voxels, if any. */
    public List<String> warnings() {
        List<String> w = new ArrayList<>(header.warnings());
        if (nonFiniteVoxels > 0) {
            w.add(nonFiniteVoxels + " voxels are NaN or infinite");
        }
        return Collections.unmodifiableList(w);
    }
}
