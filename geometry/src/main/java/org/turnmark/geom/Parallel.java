package org.turnmark.geom;

import java.util.concurrent.ForkJoinPool;
import java.util.function.IntConsumer;
import java.util.stream.IntStream;

/**
 * Runs work split into fixed blocks on the common fork-join pool.
 *
 * <p>The partition into blocks is chosen by the caller from the problem size alone (never from the
 * thread count), and reductions are done per block then summed in block order, so results are
 * bit-identical for any number of threads. The number of worker threads is the JVM's
 * {@code java.util.concurrent.ForkJoinPool.common.parallelism} (the command line's {@code --threads}
 * sets it before any work starts). Work below a size threshold runs on the calling thread.
 */
public final class Parallel {

    /** Below this many blocks × items the work stays on the calling thread. */
    public static final long SEQUENTIAL_THRESHOLD = 32_768;

    private Parallel() {
    }

    /** Number of worker threads kernels may use (≥ 1). */
    public static int threads() {
        return Math.max(1, ForkJoinPool.getCommonPoolParallelism());
    }

    /** Number of blocks of {@code blockSize} needed to cover {@code n} items. */
    public static int blockCount(int n, int blockSize) {
        if (blockSize < 1) {
            throw new IllegalArgumentException("blockSize must be >= 1, got " + blockSize);
        }
        return (n + blockSize - 1) / blockSize;
    }

    /**
     * Calls {@code body.accept(b)} once for every block index {@code b} in [0, nBlocks), in parallel
     * when {@code totalWork} (an estimate of inner-loop iterations) reaches
     * {@link #SEQUENTIAL_THRESHOLD} and more than one thread is available. The body must write only
     * to block-private outputs.
     */
    public static void forEachBlock(int nBlocks, long totalWork, IntConsumer body) {
        if (nBlocks <= 1 || totalWork < SEQUENTIAL_THRESHOLD || threads() == 1) {
            for (int b = 0; b < nBlocks; b++) {
                body.accept(b);
            }
            return;
        }
        IntStream.range(0, nBlocks).parallel().forEach(body);
    }

    /**
     * Splits [0, n) into blocks of {@code blockSize} and calls {@code body.run(from, to)} for each,
     * in parallel above the threshold.
     */
    public static void forRange(int n, int blockSize, RangeBody body) {
        int nBlocks = blockCount(n, blockSize);
        forEachBlock(nBlocks, n, b -> {
            int from = b * blockSize;
            body.run(from, Math.min(n, from + blockSize));
        });
    }

    /** A block of work over the half-open index range [from, to). */
    @FunctionalInterface
    public interface RangeBody {
        void run(int from, int to);
    }
}
