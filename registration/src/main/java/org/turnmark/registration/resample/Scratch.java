package org.turnmark.registration.resample;

/**
 * Per-thread scratch arrays reused across calls, so that kernels called every iteration of a
 * registration do not allocate a fresh line or plane buffer per block (smoothing a 256×256×160
 * image with σ = 2 mm made about 180 MB of short-lived buffers per call before). A block body takes each buffer once and does not
 * fork, so a thread never holds two uses of the same slot at once.
 */
final class Scratch {

    private static final ThreadLocal<double[][]> SLOTS = ThreadLocal.withInitial(() -> new double[2][0]);

    private Scratch() {
    }

    /**
     * A scratch array of at least {@code n} doubles for this thread's {@code slot} (0 or 1); contents
     * are unspecified.
     */
    static double[] get(int slot, int n) {
        double[][] s = SLOTS.get();
        if (s[slot].length < n) {
            s[slot] = new double[n];
        }
        return s[slot];
    }
}
