package org.turnmark.app.phantom;

import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.geom.Progress;

/**
 * Generates a synthetic prone/supine case with known truth: reference anatomy
 * ({@link PhantomAnatomy}), truth postures ({@link TruthMechanics}, {@link TruthPosture}), MR-like
 * images ({@link MrRenderer}) and the truth files' contents. Deterministic for a seed: every random
 * choice comes from seeded {@link java.util.SplittableRandom} streams, and parallel work is split in
 * fixed blocks.
 */
public final class PhantomGenerator {

    /**
     * Truth displacements are rounded to multiples of 1/256 mm (≤ 0.002 mm error, far below any
     * voxel) so that the gzipped field compresses well and in-memory values equal the file's.
     */
    public static final double DISPLACEMENT_QUANTUM_MM = 1.0 / 256;

    private PhantomGenerator() {
    }

    /**
     * Generates one case.
     *
     * @param o        options
     * @param progress stage progress on [0, 1] per stage
     */
    public static PhantomCase generate(PhantomOptions o, Progress progress) {
        long t0 = System.nanoTime();
        PhantomAnatomy anatomy = PhantomAnatomy.build(o, progress.sub("anatomy", 0, 1));
        Grid3 grid = anatomy.grid();
        byte[] refLabels = anatomy.rasterizeLabels(grid);
        TruthMechanics truth = TruthMechanics.solve(anatomy, refLabels, progress);
        progress.update("images", 0);
        float[] fine = MrRenderer.referenceImage(anatomy, o.contrast());
        int n = grid.size();
        byte[] proneLabels = new byte[n];
        byte[] supineLabels = new byte[n];
        float[] proneSignal = new float[n];
        float[] supineSignal = new float[n];
        MrRenderer.sample(anatomy, fine, truth.prone(), grid, proneLabels, proneSignal);
        progress.update("images", 0.35);
        MrRenderer.sample(anatomy, fine, truth.supine(), grid, supineLabels, supineSignal);
        progress.update("images", 0.7);
        float[] proneImage = new float[n];
        float[] supineImage = new float[n];
        double sp = MrRenderer.finish(proneSignal, proneLabels, grid, o.snr(), o.seed(), 1, proneImage);
        double ss = MrRenderer.finish(supineSignal, supineLabels, grid, o.snr(), o.seed(), 2, supineImage);
        roundToIntegers(proneImage);
        roundToIntegers(supineImage);
        progress.update("truth field", 0);
        float[][] u = truthField(anatomy, truth, grid);
        int nl = anatomy.lesionCount();
        double[] lr = new double[3 * nl];
        double[] lp = new double[3 * nl];
        double[] ls = new double[3 * nl];
        for (int l = 0; l < nl; l++) {
            lesionCentroids(anatomy, truth, l, lr, lp, ls);
        }
        int nb = anatomy.breastCount();
        double[] nr = new double[3 * nb];
        double[] np = new double[3 * nb];
        double[] ns = new double[3 * nb];
        for (int b = 0; b < nb; b++) {
            double[] tip = anatomy.nipple(b);
            System.arraycopy(tip, 0, nr, 3 * b, 3);
            mapPoints(truth, tip, np, ns, 3 * b);
        }
        double[] br = anatomy.branchPoints();
        double[] bp = new double[br.length];
        double[] bs = new double[br.length];
        for (int m = 0; m < br.length; m += 3) {
            mapPoints(truth, new double[] {br[m], br[m + 1], br[m + 2]}, bp, bs, m);
        }
        progress.update("truth field", 1);
        double seconds = (System.nanoTime() - t0) * 1e-9;
        return new PhantomCase(o, anatomy, grid, refLabels, proneLabels, supineLabels, proneImage, supineImage,
                sp, ss, u, lr, lp, ls, nr, np, ns, br, bp, bs, truth, seconds);
    }

    private static void mapPoints(TruthMechanics truth, double[] ref, double[] prone, double[] supine, int at) {
        double[] q = new double[3];
        truth.prone().forwardTissue(ref, q);
        System.arraycopy(q, 0, prone, at, 3);
        truth.supine().forwardTissue(ref, q);
        System.arraycopy(q, 0, supine, at, 3);
    }

    private static void roundToIntegers(float[] a) {
        for (int i = 0; i < a.length; i++) {
            a[i] = Math.min(32767f, Math.round(a[i]));
        }
    }

    /**
     * The true prone → supine displacement on the prone grid: tissue voxels go through the reference
     * (prone inverse, then supine forward); chest wall and air follow the rigid torso placement.
     */
    static float[][] truthField(PhantomAnatomy anatomy, TruthMechanics truth, Grid3 grid) {
        int n = grid.size();
        float[] ux = new float[n];
        float[] uy = new float[n];
        float[] uz = new float[n];
        double skin = PhantomAnatomy.rasterSkinMm(grid.spacingMm(0));
        double q = DISPLACEMENT_QUANTUM_MM;
        Parallel.forEachBlock(grid.nz(), (long) n * 16, k -> {
            double[] ref = new double[3];
            double[] s = new double[3];
            VoxelSampling.forEachInSlice(grid, k, (v, p) -> {
                if (truth.prone().invertTissue(p[0], p[1], p[2], ref)
                        && TruthPosture.isTissue(anatomy.tissueClass(ref[0], ref[1], ref[2], skin))) {
                    truth.supine().forwardTissue(ref, s);
                } else {
                    truth.supine().placement().applyPoint(p, s);
                }
                ux[v] = (float) (Math.rint((s[0] - p[0]) / q) * q);
                uy[v] = (float) (Math.rint((s[1] - p[1]) / q) * q);
                uz[v] = (float) (Math.rint((s[2] - p[2]) / q) * q);
            });
        });
        return new float[][] {ux, uy, uz};
    }

    /**
     * Centroid of lesion l in the three configurations: the mean of the images of the lesion's points
     * on a lattice of half the image spacing (each lattice point stands for an equal reference volume;
     * the small volume change of the near-incompressible tissue is neglected).
     */
    private static void lesionCentroids(PhantomAnatomy a, TruthMechanics truth, int l, double[] lr, double[] lp,
                                        double[] ls) {
        double[] c = a.lesionCentre(l);
        double[] ax = a.lesionSemiAxes(l);
        double r = Math.max(ax[0], Math.max(ax[1], ax[2]));
        double h = a.grid().spacingMm(0) / 2;
        int m = (int) Math.ceil(r / h);
        double[] sr = new double[3];
        double[] sp = new double[3];
        double[] ss = new double[3];
        double[] x = new double[3];
        double[] y = new double[3];
        long count = 0;
        for (int k = -m; k <= m; k++) {
            for (int j = -m; j <= m; j++) {
                for (int i = -m; i <= m; i++) {
                    x[0] = c[0] + i * h;
                    x[1] = c[1] + j * h;
                    x[2] = c[2] + k * h;
                    if (!a.insideLesion(l, x[0], x[1], x[2])) {
                        continue;
                    }
                    count++;
                    for (int d = 0; d < 3; d++) {
                        sr[d] += x[d];
                    }
                    truth.prone().forwardTissue(x, y);
                    for (int d = 0; d < 3; d++) {
                        sp[d] += y[d];
                    }
                    truth.supine().forwardTissue(x, y);
                    for (int d = 0; d < 3; d++) {
                        ss[d] += y[d];
                    }
                }
            }
        }
        for (int d = 0; d < 3; d++) {
            lr[3 * l + d] = sr[d] / count;
            lp[3 * l + d] = sp[d] / count;
            ls[3 * l + d] = ss[d] / count;
        }
    }
}
