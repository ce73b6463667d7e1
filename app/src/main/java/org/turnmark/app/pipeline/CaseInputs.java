package org.turnmark.app.pipeline;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HexFormat;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.volume.Volume;

/**
 * Reading and preparing a case's inputs: images, labels, lesion centroids, nipples, input hashes.
 * Stateless helpers; thread safe.
 */
public final class CaseInputs {

    /** Default search radius (mm) for refining a lesion centroid on its label when no radius is given. */
    public static final double DEFAULT_LABEL_SEARCH_MM = 20.0;
    /** A nipple further than this from the skin surface (mm) is reported: about one element of a coarse model. */
    public static final double NIPPLE_SKIN_WARNING_MM = 5.0;

    private CaseInputs() {
    }

    /** Reads a scalar NIfTI image, naming the case key in errors. */
    public static Volume readImage(String key, String path) {
        try {
            return new NiftiReader().readVolume(Path.of(path)).volume();
        } catch (IOException | RuntimeException e) {
            throw new PlanInputException(key + ": cannot read image " + path + ": " + e.getMessage(), e);
        }
    }

    /**
     * Converts a label image to bytes, checking every value is one of 0..5.
     *
     * @throws PlanInputException naming the first bad voxel
     */
    public static byte[] labelBytes(Volume labels, String path) {
        float[] d = labels.data();
        byte[] out = new byte[d.length];
        Grid3 g = labels.grid();
        for (int n = 0; n < d.length; n++) {
            float v = d[n];
            if (!(v >= 0 && v <= 5 && v == Math.rint(v))) {
                int i = n % g.nx();
                int j = (n / g.nx()) % g.ny();
                int k = n / (g.nx() * g.ny());
                throw new PlanInputException("labels " + path + ": voxel (" + i + ", " + j + ", " + k + ") is " + v
                        + ", expected one of 0 air, 1 fat, 2 fibroglandular, 3 skin, 4 chest wall, 5 lesion");
            }
            out[n] = (byte) v;
        }
        return out;
    }

    /** SHA-256 (hex) of each input file, keyed by case key. */
    public static Map<String, String> hashes(CaseFile c) {
        Map<String, String> out = new LinkedHashMap<>();
        put(out, "prone_image", c.proneImage());
        put(out, "supine_image", c.supineImage());
        put(out, "labels", c.labels());
        return out;
    }

    private static void put(Map<String, String> out, String key, String path) {
        if (path == null) {
            return;
        }
        try (InputStream in = Files.newInputStream(Path.of(path))) {
            MessageDigest md = MessageDigest.getInstance("SHA-256");
            byte[] buf = new byte[1 << 16];
            int r;
            while ((r = in.read(buf)) > 0) {
                md.update(buf, 0, r);
            }
            out.put(key, HexFormat.of().formatHex(md.digest()));
        } catch (IOException e) {
            throw new PlanInputException(key + ": cannot read " + path + ": " + e.getMessage(), e);
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("SHA-256 is required of every Java runtime", e);
        }
    }

    /** Label at a world point (nearest voxel), or 0 outside the grid. */
    public static int labelAt(Grid3 g, byte[] labels, double[] p) {
        double[] v = g.worldToVoxel().applyPoint(p[0], p[1], p[2]);
        int i = (int) Math.round(v[0]);
        int j = (int) Math.round(v[1]);
        int k = (int) Math.round(v[2]);
        if (!g.contains(i, j, k)) {
            return 0;
        }
        return labels[g.index(i, j, k)];
    }

    /** The mark in world mm (voxel indices converted through the prone grid). */
    public static double[] markRasMm(CaseFile.LesionMark m, Grid3 prone) {
        if (m.positionRasMm() != null) {
            return m.positionRasMm().clone();
        }
        double[] v = m.positionVoxel();
        return prone.voxelToWorld().applyPoint(v[0], v[1], v[2]);
    }

    /**
     * A refined centroid and how it was found.
     *
     * @param onLabel true when it is the centroid of a lesion label (no hand-marking error left)
     */
    public record Centroid(double[] rasMm, String how, boolean onLabel) {
    }

    /**
     * Refines a lesion centroid: on its label (centroid of that label's voxels within the radius, or
     * {@link #DEFAULT_LABEL_SEARCH_MM}), else on the image (intensity-weighted centroid of the voxels
     * within the radius brighter than the median there: the enhancing part), else the mark itself.
     */
    public static Centroid refine(CaseFile.LesionMark m, double[] mark, Volume prone, Grid3 labelGrid, byte[] labels) {
        if (m.label() != null && labels != null) {
            double r = m.radiusMm() == null ? DEFAULT_LABEL_SEARCH_MM : m.radiusMm();
            double[] sum = new double[3];
            long[] count = new long[1];
            visitBall(labelGrid, mark, r, (idx, p) -> {
                if ((labels[idx] & 0xff) == m.label()) {
                    sum[0] += p[0];
                    sum[1] += p[1];
                    sum[2] += p[2];
                    count[0]++;
                }
            });
            if (count[0] == 0) {
                throw new PlanInputException(String.format(Locale.ROOT,
                        "lesion %s: no voxel of label %d within %.1f mm of the mark (%.1f, %.1f, %.1f) mm",
                        m.id(), m.label(), r, mark[0], mark[1], mark[2]));
            }
            return new Centroid(new double[] {sum[0] / count[0], sum[1] / count[0], sum[2] / count[0]},
                    String.format(Locale.ROOT, "centroid of label %d within %.1f mm (%d voxels)", m.label(), r, count[0]),
                    true);
        }
        if (m.radiusMm() != null) {
            List<double[]> pts = new ArrayList<>();
            List<Float> vals = new ArrayList<>();
            visitBall(prone.grid(), mark, m.radiusMm(), (idx, p) -> {
                pts.add(p.clone());
                vals.add(prone.data()[idx]);
            });
            if (pts.size() >= 2) {
                float[] sorted = new float[vals.size()];
                for (int n = 0; n < sorted.length; n++) {
                    sorted[n] = vals.get(n);
                }
                Arrays.sort(sorted);
                double median = sorted[sorted.length / 2];
                double w = 0;
                double[] c = new double[3];
                for (int n = 0; n < pts.size(); n++) {
                    double wi = Math.max(0, vals.get(n) - median);
                    w += wi;
                    for (int a = 0; a < 3; a++) {
                        c[a] += wi * pts.get(n)[a];
                    }
                }
                if (w > 0) {
                    return new Centroid(new double[] {c[0] / w, c[1] / w, c[2] / w}, String.format(Locale.ROOT,
                            "intensity-weighted centroid of the enhancing voxels within %.1f mm", m.radiusMm()), false);
                }
            }
            return new Centroid(mark, "as marked (no enhancing voxels within the radius)", false);
        }
        return new Centroid(mark, "as marked", false);
    }

    /** Visitor of voxels in a ball: flat index and world position. */
    @FunctionalInterface
    interface VoxelVisitor {
        void visit(int index, double[] worldMm);
    }

    static void visitBall(Grid3 g, double[] c, double r, VoxelVisitor v) {
        Affine3D w2v = g.worldToVoxel();
        int[] lo = new int[3];
        int[] hi = new int[3];
        Arrays.fill(lo, Integer.MAX_VALUE);
        Arrays.fill(hi, Integer.MIN_VALUE);
        for (int corner = 0; corner < 8; corner++) {
            double[] q = w2v.applyPoint(c[0] + ((corner & 1) == 0 ? -r : r), c[1] + ((corner & 2) == 0 ? -r : r),
                    c[2] + ((corner & 4) == 0 ? -r : r));
            for (int a = 0; a < 3; a++) {
                lo[a] = Math.min(lo[a], (int) Math.floor(q[a]));
                hi[a] = Math.max(hi[a], (int) Math.ceil(q[a]));
            }
        }
        int[] dims = {g.nx(), g.ny(), g.nz()};
        for (int a = 0; a < 3; a++) {
            lo[a] = Math.max(0, lo[a]);
            hi[a] = Math.min(dims[a] - 1, hi[a]);
        }
        double[] p = new double[3];
        for (int k = lo[2]; k <= hi[2]; k++) {
            for (int j = lo[1]; j <= hi[1]; j++) {
                for (int i = lo[0]; i <= hi[0]; i++) {
                    p[0] = i;
                    p[1] = j;
                    p[2] = k;
                    g.voxelToWorld().applyPoint(p, p);
                    double dx = p[0] - c[0];
                    double dy = p[1] - c[1];
                    double dz = p[2] - c[2];
                    if (dx * dx + dy * dy + dz * dz <= r * r) {
                        v.visit(g.index(i, j, k), p);
                    }
                }
            }
        }
    }

    /**
     * The most anterior (largest y) skin point of one breast: voxels labelled skin (3), or tissue
     * voxels next to air when there is no skin label, on that side of the midline (x &lt; 0 left).
     *
     * @return the point, or null if that side has no tissue
     */
    public static double[] detectNipple(Grid3 g, byte[] labels, String side, double midlineX) {
        boolean left = "left".equals(side);
        boolean anySkin = false;
        for (byte b : labels) {
            if (b == 3) {
                anySkin = true;
                break;
            }
        }
        double bestY = Double.NEGATIVE_INFINITY;
        double[] best = null;
        double[] p = new double[3];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    int idx = g.index(i, j, k);
                    int l = labels[idx];
                    boolean candidate = anySkin ? l == 3 : (l == 1 || l == 2 || l == 5) && nextToAir(g, labels, i, j, k);
                    if (!candidate) {
                        continue;
                    }
                    p[0] = i;
                    p[1] = j;
                    p[2] = k;
                    g.voxelToWorld().applyPoint(p, p);
                    if ((p[0] < midlineX) != left) {
                        continue;
                    }
                    if (p[1] > bestY) {
                        bestY = p[1];
                        best = p.clone();
                    }
                }
            }
        }
        return best;
    }

    private static boolean nextToAir(Grid3 g, byte[] labels, int i, int j, int k) {
        int[][] nb = {{1, 0, 0}, {-1, 0, 0}, {0, 1, 0}, {0, -1, 0}, {0, 0, 1}, {0, 0, -1}};
        for (int[] d : nb) {
            int a = i + d[0];
            int b = j + d[1];
            int c = k + d[2];
            if (!g.contains(a, b, c) || labels[g.index(a, b, c)] == 0) {
                return true;
            }
        }
        return false;
    }
}
