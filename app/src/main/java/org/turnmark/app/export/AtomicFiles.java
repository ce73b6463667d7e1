package org.turnmark.app.export;

import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;

/** Writes a file to a temporary name in the same folder, then moves it into place atomically. */
public final class AtomicFiles {

    /** Writes the content to an open stream (closed by the caller). */
    @FunctionalInterface
    public interface Content {
        void writeTo(OutputStream out) throws IOException;
    }

    private AtomicFiles() {
    }

    /** Writes {@code path} atomically; on failure nothing appears under {@code path}. */
    public static void write(Path path, Content content) throws IOException {
        Path dir = path.toAbsolutePath().getParent();
        Path tmp = Files.createTempFile(dir, "." + path.getFileName() + ".", ".tmp");
        boolean ok = false;
        try {
            try (OutputStream out = new BufferedOutputStream(Files.newOutputStream(tmp))) {
                content.writeTo(out);
            }
            Files.move(tmp, path, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
            ok = true;
        } finally {
            if (!ok) {
                Files.deleteIfExists(tmp);
            }
        }
    }
}
