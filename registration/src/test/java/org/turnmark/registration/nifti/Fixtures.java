package org.turnmark.registration.nifti;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URISyntaxException;
import java.net.URL;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;

/** Locates the NIfTI test fixtures under {@code src/test/resources/nifti} (see make_fixtures.py there). */
final class Fixtures {

    private Fixtures() {
    }

    /** The fixture folder on the test class path. */
    static Path dir() {
        URL u = Fixtures.class.getResource("/nifti/expected.json");
        if (u == null) {
            throw new IllegalStateException("test resource /nifti/expected.json is missing");
        }
        try {
            return Path.of(u.toURI()).getParent();
        } catch (URISyntaxException e) {
            throw new IllegalStateException(e);
        }
    }

    /** A fixture file by its name relative to the folder, e.g. {@code "nibabel/anatomical.nii"}. */
    static Path file(String relative) {
        return dir().resolve(relative);
    }

    /** expected.json: values reported by nibabel (or nifti_tool) for each fixture. */
    static Map<String, Object> expected() {
        try {
            return MiniJson.object(MiniJson.parse(Files.readString(dir().resolve("expected.json"), StandardCharsets.UTF_8)));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    static byte[] bytes(String relative) {
        try {
            return Files.readAllBytes(file(relative));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
