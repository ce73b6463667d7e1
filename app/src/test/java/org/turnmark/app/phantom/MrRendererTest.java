package org.turnmark.app.phantom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;

class MrRendererTest {

    private static final PhantomOptions OPTS = new PhantomOptions(5, 3.0, 1, "right", 350, 0.85, 0.3, 12, 1,
            PhantomOptions.Contrast.T1, 20, 6.0);

    /**
     * SNR measured back: σ̂ from the mean of pure-noise air voxels, which is Rayleigh distributed with
     * mean σ √(π/2) (closed form of the Rice distribution with zero signal). With ≥ 20,000 air voxels the
     * standard error of that mean is 0.52/√n < 0.4 %; the noisy tissue mean exceeds the noise-free one by
     * at most σ²/(2S) (Rician bias, 1/(2·SNR²) = 0.13 % at SNR 20). 2 % covers both with margin.
     */
    private static final double SNR_REL_TOL = 0.02;

    @Test
    void snrMeasuredFromTheImageMatchesTheRequest() {
        PhantomAnatomy a = PhantomAnatomy.build(OPTS, Progress.NONE);
        Grid3 g = a.grid();
        float[] fine = MrRenderer.referenceImage(a, OPTS.contrast());
        byte[] labels = new byte[g.size()];
        float[] signal = new float[g.size()];
        MrRenderer.sample(a, fine, PostureMap.IDENTITY, g, labels, signal);
        float[] noisy = new float[g.size()];
        double sigma = MrRenderer.finish(signal, labels, g, OPTS.snr(), OPTS.seed(), 1, noisy);
        double airSum = 0;
        long air = 0;
        double tissueSum = 0;
        long tissue = 0;
        int nx = g.nx();
        int ny = g.ny();
        for (int k = 2; k < g.nz() - 2; k++) {
            for (int j = 2; j < ny - 2; j++) {
                for (int i = 2; i < nx - 2; i++) {
                    int v = i + nx * (j + ny * k);
                    int l = labels[v];
                    if (l == 1 || l == 2 || l == 3 || l == 5) {
                        tissueSum += noisy[v];
                        tissue++;
                    } else if (l == 0 && allAirAround(labels, g, i, j, k)) {
                        airSum += noisy[v];
                        air++;
                    }
                }
            }
        }
        assertTrue(air > 20_000, "air voxels " + air);
        double sigmaHat = airSum / air / Math.sqrt(Math.PI / 2);
        assertEquals(sigma, sigmaHat, SNR_REL_TOL * sigma);
        double snrHat = tissueSum / tissue / sigmaHat;
        assertEquals(OPTS.snr(), snrHat, SNR_REL_TOL * OPTS.snr() * 1.5);
    }

    private static boolean allAirAround(byte[] l, Grid3 g, int i, int j, int k) {
        for (int dk = -2; dk <= 2; dk++) {
            for (int dj = -2; dj <= 2; dj++) {
                for (int di = -2; di <= 2; di++) {
                    if (l[g.index(i + di, j + dj, k + dk)] != 0) {
                        return false;
                    }
                }
            }
        }
        return true;
    }

    @Test
    void t1ShowsFatBrightAndFatSatShowsTheLesionBright() {
        // Common practice for T1-weighted and fat-suppressed contrast-enhanced breast MRI.
        for (int c = 1; c <= 6; c++) {
            if (c != PhantomAnatomy.FAT) {
                assertTrue(MrRenderer.intensity(PhantomOptions.Contrast.T1, PhantomAnatomy.FAT, 0)
                        > MrRenderer.intensity(PhantomOptions.Contrast.T1, c, 1));
            }
            if (c != PhantomAnatomy.LESION) {
                assertTrue(MrRenderer.intensity(PhantomOptions.Contrast.FATSAT, PhantomAnatomy.LESION, 0)
                        > MrRenderer.intensity(PhantomOptions.Contrast.FATSAT, c, 1));
            }
        }
        assertTrue(MrRenderer.intensity(PhantomOptions.Contrast.FATSAT, PhantomAnatomy.FAT, 0)
                < MrRenderer.intensity(PhantomOptions.Contrast.FATSAT, PhantomAnatomy.GLAND, 1));
    }

    @Test
    void biasFieldStaysWithinItsStatedAmplitude() {
        Grid3 g = Grid3.axisAligned(20, 18, 16, 5, 5, 5, -50, -40, -40);
        float[] b = MrRenderer.biasField(g, new java.util.SplittableRandom(9));
        double lo = Double.MAX_VALUE;
        double hi = 0;
        for (float v : b) {
            lo = Math.min(lo, v);
            hi = Math.max(hi, v);
        }
        // exp(±β) with float rounding of the stored value.
        assertTrue(lo >= Math.exp(-MrRenderer.BIAS_AMPLITUDE) - 1e-6 && hi <= Math.exp(MrRenderer.BIAS_AMPLITUDE) + 1e-6);
        // Not trivial: it spans at least half of its stated range.
        assertTrue(hi / lo > Math.exp(0.5 * MrRenderer.BIAS_AMPLITUDE));
    }
}
