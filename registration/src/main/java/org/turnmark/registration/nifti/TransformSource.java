package org.turnmark.registration.nifti;

/** Which header fields gave a NIfTI-1 image its voxel→world map. */
public enum TransformSource {
    /** {@code srow_x/y/z}, used because {@code sform_code} &gt; 0. */
    SFORM,
    /** The quaternion, {@code qoffset} and {@code pixdim}, used because {@code qform_code} &gt; 0. */
    QFORM,
    /** Plain scaling by {@code pixdim[1..3]} (no orientation information in the file). */
    PIXDIM;

    /** Lower-case name as printed ("sform", "qform", "pixdim"). */
    public String label() {
        return name().toLowerCase(java.util.Locale.ROOT);
    }
}
