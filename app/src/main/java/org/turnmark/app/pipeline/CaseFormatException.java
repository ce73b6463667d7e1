package org.turnmark.app.pipeline;

import java.nio.file.Path;

/**
 * A case file that cannot be used: malformed JSON, an unknown or missing key, a value out of range,
 * or a referenced file that is missing or unreadable. The message names the case file, the key (as a
 * JSON path such as {@code lesions[0].radius_mm}), what was expected and what was found.
 */
public final class CaseFormatException extends IllegalArgumentException {
    private static final long serialVersionUID = 1L;

    private final String key;

    public CaseFormatException(Path caseFile, String key, String problem) {
        super(caseFile.getFileName() + ": " + (key == null || key.isEmpty() ? "" : key + ": ") + problem);
        this.key = key;
    }

    public CaseFormatException(Path caseFile, String key, String problem, Throwable cause) {
        this(caseFile, key, problem);
        initCause(cause);
    }

    /** The JSON path of the offending key, or an empty string for whole-file problems. */
    public String key() {
        return key == null ? "" : key;
    }
}
