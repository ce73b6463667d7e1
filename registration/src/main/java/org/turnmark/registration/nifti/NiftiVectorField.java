package org.turnmark.registration.nifti;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

import org.turnmark.registration.volume.VectorField;

/**
 * A 3-component vector field read from a 5-D NIfTI-1 file ({@code dim[5]} = 3, planar components),
 * with its header. For {@code intent_code} 1006 (displacement) the components are converted to mm
 * with the header's spatial unit; they are taken as RAS components, as Turnmark writes them.
 *
 * @param header          the validated header
 * @param field           the three component arrays on the header's grid
 * @param nonFiniteValues component values that are NaN or infinite
 */
public record NiftiVectorField(NiftiHeader header, VectorField field, long nonFiniteValues) {

    /** Header warnings plus notes on the intent code and non-finite values, if any. */
    public List<String> warnings() {
        List<String> w = new ArrayList<>(header.warnings());
        if (header.intentCode() != NiftiHeader.INTENT_DISPVECT && header.intentCode() != NiftiHeader.INTENT_VECTOR) {
            w.add("intent_code is " + header.intentCode() + ", not a vector intent (1006 or 1007); "
                    + "the 3 components along dim[5] were read as a vector field");
        }
        if (nonFiniteValues > 0) {
            w.add(nonFiniteValues + " vector components are NaN or infinite");
        }
        return Collections.unmodifiableList(w);
    }
}
