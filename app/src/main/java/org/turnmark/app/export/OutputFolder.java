package org.turnmark.app.export;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.Comparator;
import java.util.stream.Stream;

/**
 * An output folder written atomically: files go into a temporary sibling folder
 * ({@code .NAME.partial-…}) that is renamed to the final name by {@link #commit()}. If anything fails
 * before that, {@link #close()} deletes the temporary folder and nothing appears under the final
 * name. An existing folder is only replaced when the caller allows it; it is first renamed aside,
 * then the new folder is moved in, then the old one is deleted, so at every moment the final name
 * holds either the old or the new complete folder.
 *
 * <p>Not thread safe; files inside may be written concurrently by the caller.
 */
public final class OutputFolder implements AutoCloseable {

    /** Raised when the target exists and overwriting was not allowed (bad input: exit code 2). */
    public static final class ExistsException extends IllegalArgumentException {
        private static final long serialVersionUID = 1L;

        public ExistsException(Path target) {
            super("output folder " + target + " already exists; choose another --out or pass --overwrite");
        }
    }

    private final Path target;
    private final Path temp;
    private final boolean overwrite;
    private boolean committed;

    private OutputFolder(Path target, Path temp, boolean overwrite) {
        this.target = target;
        this.temp = temp;
        this.overwrite = overwrite;
    }

    /**
     * Starts an output folder.
     *
     * @param target    the final folder
     * @param overwrite whether an existing target may be replaced
     * @throws ExistsException if the target exists and {@code overwrite} is false
     * @throws IOException     if the parent cannot be created or the temporary folder not made
     */
    public static OutputFolder create(Path target, boolean overwrite) throws IOException {
        Path t = target.toAbsolutePath().normalize();
        if (Files.exists(t) && !overwrite) {
            throw new ExistsException(t);
        }
        if (Files.exists(t) && !Files.isDirectory(t)) {
            throw new IllegalArgumentException("output " + t + " exists and is not a folder");
        }
        Path parent = t.getParent();
        Files.createDirectories(parent);
        Path temp = Files.createTempDirectory(parent, "." + t.getFileName() + ".partial-");
        return new OutputFolder(t, temp, overwrite);
    }

    /** The temporary folder to write into. */
    public Path dir() {
        return temp;
    }

    /** A file in the temporary folder. */
    public Path resolve(String name) {
        return temp.resolve(name);
    }

    /** The final folder. */
    public Path target() {
        return target;
    }

    /**
     * Moves the finished folder to its final name.
     *
     * @throws ExistsException if the target appeared meanwhile and overwriting is not allowed
     */
    public void commit() throws IOException {
        Path old = null;
        if (Files.exists(target)) {
            if (!overwrite) {
                throw new ExistsException(target);
            }
            old = Files.createTempDirectory(target.getParent(), "." + target.getFileName() + ".old-");
            Files.delete(old);
            move(target, old);
        }
        try {
            move(temp, target);
        } catch (IOException e) {
            if (old != null) {
                move(old, target);
            }
            throw e;
        }
        committed = true;
        if (old != null) {
            deleteRecursively(old);
        }
    }

    private static void move(Path from, Path to) throws IOException {
        try {
            Files.move(from, to, StandardCopyOption.ATOMIC_MOVE);
        } catch (AtomicMoveNotSupportedException e) {
            throw new IOException("cannot rename " + from + " to " + to + " atomically (different file systems?)", e);
        } catch (FileAlreadyExistsException e) {
            throw new IOException("cannot rename " + from + " to " + to + ": target exists", e);
        }
    }

    /** Deletes the temporary folder unless the folder was committed. */
    @Override
    public void close() {
        if (!committed) {
            try {
                deleteRecursively(temp);
            } catch (IOException e) {
                throw new UncheckedIOException("cannot remove the temporary output " + temp, e);
            }
        }
    }

    static void deleteRecursively(Path p) throws IOException {
        if (!Files.exists(p)) {
            return;
        }
        try (Stream<Path> s = Files.walk(p)) {
            for (Path q : (Iterable<Path>) s.sorted(Comparator.reverseOrder())::iterator) {
                Files.delete(q);
            }
        }
    }
}
