package org.turnmark.geom;

import java.util.concurrent.ForkJoinPool;
import java.util.concurrent.ForkJoinTask;
import java.util.function.IntConsumer;
import java.util.stream.IntStream;

/**
 * Runs work split into fixed blocks on a fork-join pool.
 *
 * <p>The partition into blocks is chosen by the caller from the problem size alone (never from the
 * thread count), and reductions are done per block then summed in block order, so results are
 * bit-identical for any number of threads. Work below a size threshold runs on the calling thread.
 *
 * <p>Thread count: when called from inside a fork-join pool (for example a test that submits work to
 * {@code new ForkJoinPool(3)}) the blocks run in that pool. Otherwise they run in Turnmark's own pool,
 * whose size is read once from the system property {@value #THREADS_PROPERTY} (the command line's
 * {@code --threads} sets it before any work starts), else from
 * {@code java.util.concurrent.ForkJoinPool.common.parallelism} if set, else the number of available
 * processors. (The JVM's common pool is not used: on a 2-core machine its parallelism is 1, which
 * would leave one core idle.)
 */
public final class Parallel {

    /** Below this many blocks × items the work stays on the calling thread. */
    public static final long SEQUENTIAL_THRESHOLD = 32_768;

    /** System property giving the number of worker threads (≥ 1). */
    public static final String THREADS_PROPERTY = "turnmark.threads";

    private Parallel() {
    }

    /** Lazily created pool, sized once from the properties. */
    private static final class Holder {
        static final ForkJoinPool POOL = new ForkJoinPool(configuredThreads());
    }

    static int configuredThreads() {
        for (String key : new String[] {THREADS_PROPERTY, "java.util.concurrent.ForkJoinPool.common.parallelism"}) {
            String v = System.getProperty(key);
            if (v != null) {
                try {
                    int t = Integer.parseInt(v.trim());
                    if (t >= 1) {
                        return t;
                    }
                } catch (NumberFormatException e) {
                    throw new IllegalArgumentException(key + " must be a whole number >= 1, got '" + v + "'", e);
                }
                throw new IllegalArgumentException(key + " must be >= 1, got " + v);
            }
        }
        return Math.max(1, Runtime.getRuntime().availableProcessors());
    }

    /** Number of worker threads kernels called from this thread may use (≥ 1). */
    public static int threads() {
        ForkJoinPool current = ForkJoinTask.getPool();
        if (current != null) {
            return Math.max(1, current.getParallelism());
        }
        return Holder.POOL.getParallelism();
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
     * to block-private outputs. An exception thrown by a block is rethrown to the caller.
     */
    public static void forEachBlock(int nBlocks, long totalWork, IntConsumer body) {
        if (nBlocks <= 1 || totalWork < SEQUENTIAL_THRESHOLD || threads() == 1) {
            for (int b = 0; b < nBlocks; b++) {
                body.accept(b);
            }
            return;
        }
        if (ForkJoinTask.inForkJoinPool()) {
            // Already on a pool worker: a parallel stream runs in the enclosing pool.
            IntStream.range(0, nBlocks).parallel().forEach(body);
            return;
        }
        Holder.POOL.submit(() -> IntStream.range(0, nBlocks).parallel().forEach(body)).join();
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
