package org.turnmark.app.pipeline;

import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.registration.resample.GaussianSmoothing;
import org.turnmark.registration.volume.Volume;

/**
 * Automatic segmentation of a prone T1-weighted-like breast image (fat bright, fibroglandular tissue
 * darker) into the model's labels when no label image is given.
 *
 * <ol>
 *   <li>Body vs air: Otsu's threshold (Otsu, IEEE Trans SMC 9, 1979) on the intensity histogram, the
 *       largest 6-connected component, holes filled (air not connected to the border becomes body).</li>
 *   <li>Chest wall: the breasts hang anteriorly (+y) in the prone posture, so the coronal cross-section
 *       area of the body drops sharply at the breast base. The chest-wall plane is the most anterior
 *       coronal slice whose body area is at least {@link #TORSO_AREA_FRACTION} of the largest; body voxels
 *       posterior to it become chest wall (4). A plane through three points given in the case file
 *       overrides this (voxels on the posterior side become chest wall).</li>
 *   <li>Skin: breast voxels within {@link #SKIN_MM} of air (by erosion in voxel steps).</li>
 *   <li>Fat vs fibroglandular: the smooth multiplicative bias is removed by dividing by the normalised
 *       Gaussian average of the breast intensities (σ {@link #BIAS_SIGMA_MM}), then Otsu's threshold on
 *       the corrected values splits bright fat (1) from darker gland (2).</li>
 * </ol>
 * The labels are on the prone image grid. A contrast where fat is dark (fat-suppressed) would swap the
 * two tissue classes: give labels for such images. Stateless.
 */
public final class AutoSegmentation {

    /** A coronal slice belongs to the torso if its body area is at least this fraction of the largest. */
    public static final double TORSO_AREA_FRACTION = 0.6;
    /** Skin thickness (mm): 1.5–2 mm in the breast (common practice). */
    public static final double SKIN_MM = 2.0;
    /** Width (mm) of the smoothing that estimates the bias field: far wider than glandular structures. */
    public static final double BIAS_SIGMA_MM = 25.0;
    private static final int BINS = 256;

    /**
     * Labels and notes.
     *
     * @param grid   the prone grid
     * @param labels one label per voxel (0 air, 1 fat, 2 gland, 3 skin, 4 chest wall)
     * @param notes  what was done, with the thresholds, for the plan's warnings
     */
    public record Result(Grid3 grid, byte[] labels, List<String> notes) {
        /** The labels as a volume of whole numbers. */
        public Volume asVolume() {
            float[] f = new float[labels.length];
            for (int n = 0; n < f.length; n++) {
                f[n] = labels[n];
            }
            return new Volume(grid, f);
        }
    }

    private AutoSegmentation() {
    }

    /**
     * Segments the prone image.
     *
     * @param prone          the image
     * @param chestWallPlane three points (RAS mm) of a plane overriding the automatic chest wall, or null
     * @param progress       progress ("segmentation")
     * @throws PlanInputException if no body can be separated from the background
     */
    public static Result segment(Volume prone, List<double[]> chestWallPlane, Progress progress) {
        Grid3 g = prone.grid();
        float[] img = prone.data();
        int n = img.length;
        List<String> notes = new ArrayList<>();
        double t = otsu(img, null);
        boolean[] body = bodyMask(prone, t);
        if (body == null) {
            throw new PlanInputException("automatic segmentation: the prone image has no contrast between body and "
                    + "background (Otsu threshold " + t + "); give a label image");
        }
        progress.update("segmentation", 0.3);

        byte[] labels = new byte[n];
        for (int v = 0; v < n; v++) {
            labels[v] = body[v] ? (byte) 1 : 0;
        }
        // Chest wall.
        if (chestWallPlane != null) {
            double[] a = chestWallPlane.get(0);
            double[] b = chestWallPlane.get(1);
            double[] c = chestWallPlane.get(2);
            double[] nrm = cross(sub(b, a), sub(c, a));
            if (nrm[1] < 0) {
                nrm = new double[] {-nrm[0], -nrm[1], -nrm[2]};
            }
            int wall = 0;
            for (int k = 0; k < g.nz(); k++) {
                for (int j = 0; j < g.ny(); j++) {
                    for (int i = 0; i < g.nx(); i++) {
                        int v = g.index(i, j, k);
                        if (body[v]) {
                            double[] p = g.worldOf(i, j, k);
                            if (dot(nrm, sub(p, a)) < 0) {
                                labels[v] = 4;
                                wall++;
                            }
                        }
                    }
                }
            }
            notes.add("automatic segmentation: chest wall from the given plane (" + wall + " voxels posterior to it)");
        } else {
            double yWall = chestWallY(g, body);
            for (int k = 0; k < g.nz(); k++) {
                for (int j = 0; j < g.ny(); j++) {
                    for (int i = 0; i < g.nx(); i++) {
                        int v = g.index(i, j, k);
                        if (body[v] && g.worldOf(i, j, k)[1] <= yWall) {
                            labels[v] = 4;
                        }
                    }
                }
            }
            notes.add(String.format(Locale.ROOT, "automatic segmentation: chest wall = body posterior to the coronal "
                    + "plane y = %.1f mm (breast base, where the body cross-section narrows)", yWall));
        }
        progress.update("segmentation", 0.5);
        // Skin: breast voxels within SKIN_MM of air, by erosion in steps of the smallest spacing.
        double step = Math.min(g.spacingMm(0), Math.min(g.spacingMm(1), g.spacingMm(2)));
        int layers = Math.max(1, (int) Math.round(SKIN_MM / step));
        boolean[] inner = body.clone();
        for (int it = 0; it < layers; it++) {
            inner = erode(g, inner);
        }
        for (int v = 0; v < n; v++) {
            if (labels[v] == 1 && !inner[v]) {
                labels[v] = 3;
            }
        }
        // Bias correction by normalised convolution over the breast tissue, then Otsu for fat vs gland.
        float[] masked = new float[n];
        float[] mask = new float[n];
        for (int v = 0; v < n; v++) {
            if (labels[v] == 1) {
                masked[v] = img[v];
                mask[v] = 1;
            }
        }
        float[] sm = new float[n];
        float[] sw = new float[n];
        GaussianSmoothing.smooth(masked, sm, g, BIAS_SIGMA_MM);
        GaussianSmoothing.smooth(mask, sw, g, BIAS_SIGMA_MM);
        progress.update("segmentation", 0.8);
        float[] corrected = new float[n];
        boolean[] tissue = new boolean[n];
        for (int v = 0; v < n; v++) {
            if (labels[v] == 1 && sw[v] > 1e-6f && sm[v] > 0) {
                corrected[v] = img[v] / (sm[v] / sw[v]);
                tissue[v] = true;
            }
        }
        double tg = otsu(corrected, tissue);
        int gland = 0;
        for (int v = 0; v < n; v++) {
            if (tissue[v] && corrected[v] <= tg) {
                labels[v] = 2;
                gland++;
            }
        }
        notes.add(String.format(Locale.ROOT, "automatic segmentation: body threshold %.4g (Otsu), skin %.1f mm, "
                + "fat/fibroglandular threshold %.3f of the local mean (Otsu after bias correction), %d fibroglandular "
                + "voxels; check the segmentation pictures in the report", t, layers * step, tg, gland));
        progress.update("segmentation", 1);
        return new Result(g, labels, notes);
    }

    /**
     * Body (non-air) voxels of an MR image: Otsu's threshold, the largest connected component, holes
     * filled; null if the threshold separates nothing (no contrast).
     */
    static boolean[] bodyMask(Volume image) {
        return bodyMask(image, otsu(image.data(), null));
    }

    private static boolean[] bodyMask(Volume image, double t) {
        Grid3 g = image.grid();
        float[] img = image.data();
        int n = img.length;
        boolean[] body = new boolean[n];
        int count = 0;
        for (int v = 0; v < n; v++) {
            body[v] = img[v] > t;
            if (body[v]) {
                count++;
            }
        }
        if (count == 0 || count == n) {
            return null;
        }
        body = largestComponent(g, body);
        fillHoles(g, body);
        return body;
    }

    /** Otsu's threshold over the values where {@code mask} is true (all if null). */
    static double otsu(float[] x, boolean[] mask) {
        float lo = Float.POSITIVE_INFINITY;
        float hi = Float.NEGATIVE_INFINITY;
        for (int v = 0; v < x.length; v++) {
            if ((mask == null || mask[v]) && Float.isFinite(x[v])) {
                lo = Math.min(lo, x[v]);
                hi = Math.max(hi, x[v]);
            }
        }
        if (!(hi > lo)) {
            return lo;
        }
        long[] hist = new long[BINS];
        double w = (hi - lo) / BINS;
        long total = 0;
        for (int v = 0; v < x.length; v++) {
            if ((mask == null || mask[v]) && Float.isFinite(x[v])) {
                int b = (int) Math.min(BINS - 1, (x[v] - lo) / w);
                hist[b]++;
                total++;
            }
        }
        double sumAll = 0;
        for (int b = 0; b < BINS; b++) {
            sumAll += b * (double) hist[b];
        }
        double sumB = 0;
        long wB = 0;
        double best = -1;
        int bestB = 0;
        for (int b = 0; b < BINS; b++) {
            wB += hist[b];
            if (wB == 0) {
                continue;
            }
            long wF = total - wB;
            if (wF == 0) {
                break;
            }
            sumB += b * (double) hist[b];
            double mB = sumB / wB;
            double mF = (sumAll - sumB) / wF;
            double between = (double) wB * wF * (mB - mF) * (mB - mF);
            if (between > best) {
                best = between;
                bestB = b;
            }
        }
        return lo + (bestB + 1) * w;
    }

    private static double chestWallY(Grid3 g, boolean[] body) {
        // Body area per coronal position y, binned by 1 mm in world y (works for any voxel orientation).
        double yMin = Double.POSITIVE_INFINITY;
        double yMax = Double.NEGATIVE_INFINITY;
        for (int k = 0; k < g.nz(); k += Math.max(1, g.nz() - 1)) {
            for (int j = 0; j < g.ny(); j += Math.max(1, g.ny() - 1)) {
                for (int i = 0; i < g.nx(); i += Math.max(1, g.nx() - 1)) {
                    double y = g.worldOf(i, j, k)[1];
                    yMin = Math.min(yMin, y);
                    yMax = Math.max(yMax, y);
                }
            }
        }
        int bins = (int) Math.ceil(yMax - yMin) + 1;
        double[] area = new double[bins];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    if (body[g.index(i, j, k)]) {
                        area[(int) (g.worldOf(i, j, k)[1] - yMin)] += 1;
                    }
                }
            }
        }
        double max = 0;
        for (double a : area) {
            max = Math.max(max, a);
        }
        int last = 0;
        for (int b = 0; b < bins; b++) {
            if (area[b] >= TORSO_AREA_FRACTION * max) {
                last = b;
            }
        }
        return yMin + last + 0.5;
    }

    private static final int[][] NB6 = {{1, 0, 0}, {-1, 0, 0}, {0, 1, 0}, {0, -1, 0}, {0, 0, 1}, {0, 0, -1}};

    private static boolean[] erode(Grid3 g, boolean[] in) {
        boolean[] out = new boolean[in.length];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    int v = g.index(i, j, k);
                    if (!in[v]) {
                        continue;
                    }
                    boolean keep = true;
                    for (int[] d : NB6) {
                        int a = i + d[0];
                        int b = j + d[1];
                        int c = k + d[2];
                        if (!g.contains(a, b, c) || !in[g.index(a, b, c)]) {
                            keep = false;
                            break;
                        }
                    }
                    out[v] = keep;
                }
            }
        }
        return out;
    }

    private static boolean[] largestComponent(Grid3 g, boolean[] m) {
        int n = m.length;
        int[] comp = new int[n];
        int best = 0;
        int bestSize = 0;
        int id = 0;
        ArrayDeque<Integer> q = new ArrayDeque<>();
        for (int s = 0; s < n; s++) {
            if (!m[s] || comp[s] != 0) {
                continue;
            }
            id++;
            int size = 0;
            comp[s] = id;
            q.add(s);
            while (!q.isEmpty()) {
                int v = q.poll();
                size++;
                int i = v % g.nx();
                int j = (v / g.nx()) % g.ny();
                int k = v / (g.nx() * g.ny());
                for (int[] d : NB6) {
                    int a = i + d[0];
                    int b = j + d[1];
                    int c = k + d[2];
                    if (g.contains(a, b, c)) {
                        int w = g.index(a, b, c);
                        if (m[w] && comp[w] == 0) {
                            comp[w] = id;
                            q.add(w);
                        }
                    }
                }
            }
            if (size > bestSize) {
                bestSize = size;
                best = id;
            }
        }
        boolean[] out = new boolean[n];
        for (int v = 0; v < n; v++) {
            out[v] = comp[v] == best && best != 0;
        }
        return out;
    }

    /** Background not connected to the grid border becomes body. */
    private static void fillHoles(Grid3 g, boolean[] body) {
        int n = body.length;
        boolean[] outside = new boolean[n];
        ArrayDeque<Integer> q = new ArrayDeque<>();
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    boolean border = i == 0 || j == 0 || k == 0 || i == g.nx() - 1 || j == g.ny() - 1 || k == g.nz() - 1;
                    int v = g.index(i, j, k);
                    if (border && !body[v] && !outside[v]) {
                        outside[v] = true;
                        q.add(v);
                    }
                }
            }
        }
        while (!q.isEmpty()) {
            int v = q.poll();
            int i = v % g.nx();
            int j = (v / g.nx()) % g.ny();
            int k = v / (g.nx() * g.ny());
            for (int[] d : NB6) {
                int a = i + d[0];
                int b = j + d[1];
                int c = k + d[2];
                if (g.contains(a, b, c)) {
                    int w = g.index(a, b, c);
                    if (!body[w] && !outside[w]) {
                        outside[w] = true;
                        q.add(w);
                    }
                }
            }
        }
        for (int v = 0; v < n; v++) {
            if (!outside[v]) {
                body[v] = true;
            }
        }
    }

    private static double[] sub(double[] a, double[] b) {
        return new double[] {a[0] - b[0], a[1] - b[1], a[2] - b[2]};
    }

    private static double[] cross(double[] a, double[] b) {
        return new double[] {a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]};
    }

    private static double dot(double[] a, double[] b) {
        return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
    }
}
