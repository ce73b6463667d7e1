package org.turnmark.registration.metric;

import java.util.Random;

import org.turnmark.geom.Grid3;

/** Small smooth random images for the metric tests (seeded). */
final class MetricTestImages {

    private MetricTestImages() {
    }

    /** A smooth random image: a few random Gaussian blobs plus noise, values roughly in [0, 100]. */
    static float[] blobs(Grid3 g, long seed, double noise) {
        Random r = new Random(seed);
        float[] a = new float[g.size()];
        int blobs = 6;
        double[][] c = new double[blobs][4];
        for (double[] b : c) {
            b[0] = r.nextDouble() * g.nx();
            b[1] = r.nextDouble() * g.ny();
            b[2] = r.nextDouble() * g.nz();
            b[3] = 20 + 60 * r.nextDouble();
        }
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double v = 10;
                    for (double[] b : c) {
                        double d2 = (i - b[0]) * (i - b[0]) + (j - b[1]) * (j - b[1]) + (k - b[2]) * (k - b[2]);
                        v += b[3] * Math.exp(-d2 / 12.0);
                    }
                    a[g.index(i, j, k)] = (float) (v + noise * r.nextGaussian());
                }
            }
        }
        return a;
    }

    static byte[] allInside(int n) {
        byte[] m = new byte[n];
        java.util.Arrays.fill(m, (byte) 1);
        return m;
    }
}
