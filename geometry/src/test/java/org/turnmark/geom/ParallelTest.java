package org.turnmark.geom;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Random;

import org.junit.jupiter.api.Test;

class ParallelTest {

    @Test
    void blockReductionIsBitIdenticalToSequentialBlockOrder() {
        int n = 1_000_003;
        double[] x = new double[n];
        Random r = new Random(3);
        for (int i = 0; i < n; i++) {
            x[i] = r.nextGaussian() * 1e6;
        }
        int block = 4096;
        int nb = Parallel.blockCount(n, block);
        double[] partial = new double[nb];
        Parallel.forRange(n, block, (from, to) -> {
            double s = 0;
            for (int i = from; i < to; i++) {
                s += x[i];
            }
            partial[from / block] = s;
        });
        double parallelSum = 0;
        for (double p : partial) {
            parallelSum += p;
        }
        double sequential = 0;
        for (int b = 0; b < nb; b++) {
            double s = 0;
            for (int i = b * block; i < Math.min(n, (b + 1) * block); i++) {
                s += x[i];
            }
            sequential += s;
        }
        assertEquals(sequential, parallelSum, 0.0);
    }

    @Test
    void threadCountFollowsTheEnclosingPool() throws Exception {
        java.util.concurrent.ForkJoinPool pool = new java.util.concurrent.ForkJoinPool(3);
        try {
            assertEquals(3, pool.submit(Parallel::threads).get());
        } finally {
            pool.shutdown();
        }
    }

    @Test
    void blockExceptionsReachTheCaller() {
        org.junit.jupiter.api.Assertions.assertThrows(IllegalStateException.class,
                () -> Parallel.forEachBlock(64, Parallel.SEQUENTIAL_THRESHOLD, b -> {
                    if (b == 17) {
                        throw new IllegalStateException("block 17");
                    }
                }));
    }

    @Test
    void everyIndexIsVisitedOnce() {
        int n = 100_001;
        int[] hits = new int[n];
        Parallel.forRange(n, 777, (from, to) -> {
            for (int i = from; i < to; i++) {
                hits[i]++;
            }
        });
        for (int i = 0; i < n; i++) {
            assertEquals(1, hits[i], "index " + i);
        }
    }
}
