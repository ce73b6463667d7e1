package org.turnmark.registration.nifti;

import java.io.IOException;

/**
 * A NIfTI-1 file that cannot be read (or a volume that cannot be written) as asked: missing or
 * truncated file, wrong magic, unsupported or inconsistent header field, corrupt gzip stream, a
 * header that would need more memory than allowed. The message names the file and the field, the
 * value found and what was expected; {@link #path()}, {@link #field()} and {@link #value()} carry
 * them for programs.
 */
public final class NiftiFormatException extends IOException {

    private static final long serialVersionUID = 1L;

    private final String path;
    private final String field;
    private final String value;

    /**
     * @param path    the file concerned, as shown to the user
     * @param field   the header field or part of the file at fault (e.g. {@code "dim[2]"},
     *                {@code "datatype"}, {@code "gzip stream"})
     * @param value   the offending value as text
     * @param problem what is wrong and what was expected, without the file name
     */
    public NiftiFormatException(String path, String field, String value, String problem) {
        this(path, field, value, problem, null);
    }

    /** As {@link #NiftiFormatException(String, String, String, String)} with an underlying cause. */
    public NiftiFormatException(String path, String field, String value, String problem, Throwable cause) {
        super(path + ": " + field + ": " + problem, cause);
        this.path = path;
        this.field = field;
        this.value = value;
    }

    /** The file concerned. */
    public String path() {
        return path;
    }

    /** The header field or part of the file at fault. */
    public String field() {
        return field;
    }

    /** The offending value, as text. */
    public String value() {
        return value;
    }
}
