package org.turnmark.mechanics.mesh;

import java.util.Arrays;

/**
 * Finds the element of a hexahedral mesh containing a world point, and its local coordinates.
 *
 * <p>Elements are binned by their bounding boxes into a uniform grid of cubic bins whose edge is the
 * mean element bounding-box edge; a query visits only the elements of its bin, in increasing element
 * order, and accepts the first whose inverse trilinear map (Newton, {@link TrilinearHex#invert})
 * converges to local coordinates within [−{@link #INSIDE_TOLERANCE}, 1 + {@link #INSIDE_TOLERANCE}]³
 * (then clamped to [0, 1]). A point on a shared face therefore always gets the lower-numbered element:
 * results are deterministic. Points in no element are reported as {@link #OUTSIDE}.
 *
 * <p>The node array is kept by reference and must not change afterwards. Thread safe: queries only
 * read shared state and use caller-supplied scratch.
 */
public final class HexLocator {

    /** Returned by {@link #locate} for a point inside no element. */
    public static final int OUTSIDE = -1;

    /**
     * Slack on local coordinates (fraction of an element) for accepting a point: absorbs round-off of
     * Newton's iterate for points exactly on faces (≈ 1e-15 relative), far below any image voxel.
     */
    public static final double INSIDE_TOLERANCE = 1e-9;

    private final int[] hex;
    private final double[] xyz;
    private final double[] boxes;
    private final double ox;
    private final double oy;
    private final double oz;
    private final double invBin;
    private final int bx;
    private final int by;
    private final int bz;
    private final int[] binStart;
    private final int[] binElements;

    /** A locator over {@code mesh} at its own node positions. */
    public HexLocator(HexMesh mesh) {
        this(mesh.hex(), mesh.xyzMm());
    }

    /**
     * A locator over connectivity {@code hex} at node positions {@code xyzMm} (for example a deformed
     * configuration). Neither array is copied or modified.
     */
    public HexLocator(int[] hex, double[] xyzMm) {
        this.hex = hex;
        this.xyz = xyzMm;
        int ne = hex.length / 8;
        if (ne == 0) {
            throw new IllegalArgumentException("cannot locate points in a mesh without elements");
        }
        boxes = new double[6 * ne];
        double[] lo = {Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY};
        double[] hi = {Double.NEGATIVE_INFINITY, Double.NEGATIVE_INFINITY, Double.NEGATIVE_INFINITY};
        double meanEdge = 0;
        for (int e = 0; e < ne; e++) {
            for (int c = 0; c < 3; c++) {
                double mn = Double.POSITIVE_INFINITY;
                double mx = Double.NEGATIVE_INFINITY;
                for (int a = 0; a < 8; a++) {
                    double v = xyzMm[3 * hex[8 * e + a] + c];
                    mn = Math.min(mn, v);
                    mx = Math.max(mx, v);
                }
                // Pad boxes like the local tolerance so that points on faces are never missed.
                double pad = INSIDE_TOLERANCE * (mx - mn) + 1e-12 * (Math.abs(mn) + Math.abs(mx));
                boxes[6 * e + c] = mn - pad;
                boxes[6 * e + 3 + c] = mx + pad;
                lo[c] = Math.min(lo[c], mn - pad);
                hi[c] = Math.max(hi[c], mx + pad);
                meanEdge += (mx - mn) / (3.0 * ne);
            }
        }
        double ext = Math.max(hi[0] - lo[0], Math.max(hi[1] - lo[1], hi[2] - lo[2]));
        double bin = meanEdge > 0 ? meanEdge : Math.max(ext, 1e-9);
        // Keep the bin grid no larger than ~8 bins per element.
        while (cells(lo, hi, bin) > 8L * ne + 64) {
            bin *= 1.5;
        }
        ox = lo[0];
        oy = lo[1];
        oz = lo[2];
        invBin = 1.0 / bin;
        bx = (int) ((hi[0] - lo[0]) * invBin) + 1;
        by = (int) ((hi[1] - lo[1]) * invBin) + 1;
        bz = (int) ((hi[2] - lo[2]) * invBin) + 1;
        binStart = new int[bx * by * bz + 1];
        for (int e = 0; e < ne; e++) {
            forEachBin(e, b -> binStart[b + 1]++);
        }
        for (int b = 0; b < binStart.length - 1; b++) {
            binStart[b + 1] += binStart[b];
        }
        binElements = new int[binStart[binStart.length - 1]];
        int[] fill = Arrays.copyOf(binStart, binStart.length - 1);
        for (int e = 0; e < ne; e++) {
            final int el = e;
            forEachBin(e, b -> binElements[fill[b]++] = el);
        }
    }

    /** Calls {@code body} with every bin overlapped by element e's bounding box. */
    private void forEachBin(int e, java.util.function.IntConsumer body) {
        int i0 = binX(boxes[6 * e]);
        int i1 = binX(boxes[6 * e + 3]);
        int j0 = binY(boxes[6 * e + 1]);
        int j1 = binY(boxes[6 * e + 4]);
        int k0 = binZ(boxes[6 * e + 2]);
        int k1 = binZ(boxes[6 * e + 5]);
        for (int k = k0; k <= k1; k++) {
            for (int j = j0; j <= j1; j++) {
                for (int i = i0; i <= i1; i++) {
                    body.accept(i + bx * (j + by * k));
                }
            }
        }
    }

    private static long cells(double[] lo, double[] hi, double bin) {
        return ((long) ((hi[0] - lo[0]) / bin) + 1) * ((long) ((hi[1] - lo[1]) / bin) + 1)
                * ((long) ((hi[2] - lo[2]) / bin) + 1);
    }

    private int binX(double x) {
        return Math.max(0, Math.min(bx - 1, (int) ((x - ox) * invBin)));
    }

    private int binY(double y) {
        return Math.max(0, Math.min(by - 1, (int) ((y - oy) * invBin)));
    }

    private int binZ(double z) {
        return Math.max(0, Math.min(bz - 1, (int) ((z - oz) * invBin)));
    }

    /** Number of elements. */
    public int elementCount() {
        return hex.length / 8;
    }

    /**
     * Finds the element containing world point (x, y, z) mm.
     *
     * @param rst  out: local coordinates in [0, 1]³ (length ≥ 3); undefined when the point is outside
     * @param work scratch, length ≥ 12
     * @return the element index, or {@link #OUTSIDE}
     */
    public int locate(double x, double y, double z, double[] rst, double[] work) {
        double fx = (x - ox) * invBin;
        double fy = (y - oy) * invBin;
        double fz = (z - oz) * invBin;
        if (!(fx >= 0 && fy >= 0 && fz >= 0 && fx < bx && fy < by && fz < bz)) {
            return OUTSIDE; // also rejects NaN
        }
        int b = (int) fx + bx * ((int) fy + by * (int) fz);
        double lo = -INSIDE_TOLERANCE;
        double hi = 1 + INSIDE_TOLERANCE;
        for (int n = binStart[b]; n < binStart[b + 1]; n++) {
            int e = binElements[n];
            int o = 6 * e;
            if (x < boxes[o] || y < boxes[o + 1] || z < boxes[o + 2]
                    || x > boxes[o + 3] || y > boxes[o + 4] || z > boxes[o + 5]) {
                continue;
            }
            if (!TrilinearHex.invert(hex, e, xyz, x, y, z, rst, work)) {
                continue;
            }
            double r = rst[0];
            double s = rst[1];
            double t = rst[2];
            if (r >= lo && r <= hi && s >= lo && s <= hi && t >= lo && t <= hi) {
                rst[0] = Math.max(0, Math.min(1, r));
                rst[1] = Math.max(0, Math.min(1, s));
                rst[2] = Math.max(0, Math.min(1, t));
                return e;
            }
        }
        return OUTSIDE;
    }
}
