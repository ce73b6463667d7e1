package org.turnmark.registration.nifti;

/**
 * NIfTI-1 {@code datatype} codes ({@code nifti1.h}, NIFTI_TYPE_*). The first eight are read; the
 * rest are recognised only so that they can be rejected by name.
 */
public enum NiftiDatatype {
    UINT8(2, 8, true),
    INT8(256, 8, true),
    INT16(4, 16, true),
    UINT16(512, 16, true),
    INT32(8, 32, true),
    UINT32(768, 32, true),
    FLOAT32(16, 32, true),
    FLOAT64(64, 64, true),
    BINARY(1, 1, false),
    COMPLEX64(32, 64, false),
    RGB24(128, 24, false),
    INT64(1024, 64, false),
    UINT64(1280, 64, false),
    FLOAT128(1536, 128, false),
    COMPLEX128(1792, 128, false),
    COMPLEX256(2048, 256, false),
    RGBA32(2304, 32, false);

    private final int code;
    private final int bitpix;
    private final boolean readable;

    NiftiDatatype(int code, int bitpix, boolean readable) {
        this.code = code;
        this.bitpix = bitpix;
        this.readable = readable;
    }

    /** The {@code datatype} code stored in the header. */
    public int code() {
        return code;
    }

    /** Bits per voxel ({@code bitpix}) for this type. */
    public int bitpix() {
        return bitpix;
    }

    /** Bytes per voxel for readable types. */
    public int bytesPerVoxel() {
        return bitpix / 8;
    }

    /** True if Turnmark reads this type. */
    public boolean isReadable() {
        return readable;
    }

    /** Lower-case name as printed, e.g. "int16", "float32". */
    public String label() {
        return name().toLowerCase(java.util.Locale.ROOT);
    }

    /** The type with this code, or null if the code is not defined by {@code nifti1.h}. */
    public static NiftiDatatype fromCode(int code) {
        for (NiftiDatatype t : values()) {
            if (t.code == code) {
                return t;
            }
        }
        return null;
    }
}
