package org.turnmark.registration.nifti;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.lang.management.ManagementFactory;

import com.code_intelligence.jazzer.junit.FuzzTest;

/**
 * Coverage-guided fuzz test of the NIfTI-1 header and data reader (Jazzer's JUnit integration).
 *
 * <p>Property: for any byte string, reading it as a single-file image either succeeds or raises the
 * reader's own {@link NiftiFormatException} naming the file; nothing else escapes (no
 * {@code ArrayIndexOutOfBoundsException}, {@code OutOfMemoryError}, {@code NegativeArraySizeException},
 * ...), and the thread allocates no more than the reader's limit plus a fixed overhead.
 *
 * <p>In the normal test run it replays the seed corpus (valid files from {@code make_fixtures.py}) in
 * {@code NiftiReaderFuzzTestInputs/}; the {@code nifti-fuzz} surefire execution then fuzzes it for
 * {@link #BOUNDED_RUNS} inputs. Longer runs: see docs/nifti.md.
 */
class NiftiReaderFuzzTest {

    /** Memory limit given to the reader under fuzzing (bytes): small, so header claims hit it. */
    static final long FUZZ_LIMIT_BYTES = 1 << 20;

    /**
     * Allocation allowed on top of the limit: the reader's transfer buffer
     * ({@link NiftiReader#CHUNK_BYTES}) plus 1 MiB for stream buffers (gzip and buffered streams,
     * 64 KiB each), the header, messages and exceptions.
     */
    static final long OVERHEAD_BYTES = NiftiReader.CHUNK_BYTES + (1 << 20);

    /** Inputs tried by the bounded fuzzing run inside {@code mvn verify}. */
    static final long BOUNDED_RUNS = 5_000;

    private static final String NAME = "fuzz-input.nii";

    @FuzzTest(maxExecutions = BOUNDED_RUNS, maxDuration = "2m")
    void readerRaisesOnlyItsOwnError(byte[] data) {
        NiftiReader reader = new NiftiReader(FUZZ_LIMIT_BYTES);
        // The first read of an input may load (and, under the fuzzer, instrument) classes, which
        // the JVM counts as this thread's allocation; the second read measures the reader alone.
        readOnce(reader, data);
        com.sun.management.ThreadMXBean threads = (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();
        long before = threads.getCurrentThreadAllocatedBytes();
        readOnce(reader, data);
        long used = threads.getCurrentThreadAllocatedBytes() - before;
        assertTrue(used <= FUZZ_LIMIT_BYTES + OVERHEAD_BYTES,
                "reader allocated " + used + " bytes, limit " + FUZZ_LIMIT_BYTES + " + overhead " + OVERHEAD_BYTES);
    }

    private static void readOnce(NiftiReader reader, byte[] data) {
        try {
            NiftiHeader h = reader.readHeader(data, NAME);
            if (h.isVectorField()) {
                NiftiVectorField f = reader.readVectorField(data, NAME);
                assertEquals(f.field().grid().size(), f.field().x().length);
            } else {
                NiftiVolume v = reader.readVolume(data, NAME, 0);
                assertEquals(v.volume().grid().size(), v.volume().data().length);
            }
        } catch (NiftiFormatException e) {
            assertTrue(e.getMessage().startsWith(NAME + ": "), "message names the file: " + e.getMessage());
            assertTrue(e.field() != null && !e.field().isEmpty(), "names a field: " + e.getMessage());
        }
    }
}
