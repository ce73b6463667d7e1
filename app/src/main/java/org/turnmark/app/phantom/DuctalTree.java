package org.turnmark.app.phantom;

import java.util.SplittableRandom;

/**
 * A random branching duct tree of one breast, grown from the nipple towards the chest wall, and the
 * lobule clusters at its terminal ducts.
 *
 * <p>Each main duct starts just behind the nipple and heads for a point on the mound's base; every
 * segment ends in a bifurcation (two children turned by 18°–40° about a random axis, 0.7–0.85 of the
 * parent's length, 0.78 of its radius) until the last generation, whose ends carry 4–7 Gaussian
 * lobules of σ 1.8–3.2 mm. A segment whose end would leave the gland envelope (closer than
 * {@link #MIN_SKIN_DEPTH_MM} to the skin or {@link #MIN_CHEST_WALL_MM} to the chest wall) is shortened
 * or dropped. Branch points (segment ends that bifurcate) are the internal landmarks.
 *
 * <p>Storage: segments as 7 doubles {x0, y0, z0, x1, y1, z1, radius}, blobs as 5 doubles
 * {x, y, z, σ, amplitude}, branch points as 3 doubles; RAS mm in the reference configuration.
 */
final class DuctalTree {

    /** A segment end (and every landmark) lies at least this far under the skin (mm). */
    static final double MIN_SKIN_DEPTH_MM = 10.0;
    /** A segment end lies at least this far anterior of the chest wall (mm). */
    static final double MIN_CHEST_WALL_MM = 8.0;

    /** Envelope test used while growing. */
    interface Envelope {
        /** Depth under the skin (mm), positive inside the body. */
        double skinDepth(double x, double y, double z);

        /** Distance anterior of the chest wall (mm), positive in front of it. */
        double chestWallDistance(double x, double y, double z);
    }

    double[] segments = new double[7 * 64];
    int segmentCount;
    double[] blobs = new double[5 * 256];
    int blobCount;
    double[] branchPoints = new double[3 * 64];
    int branchCount;

    private final SplittableRandom rng;
    private final Envelope envelope;
    private final int generations;

    private DuctalTree(SplittableRandom rng, Envelope envelope, int generations) {
        this.rng = rng;
        this.envelope = envelope;
        this.generations = generations;
    }

    /**
     * Grows the tree of one mound.
     *
     * @param mound       the breast
     * @param rng         random source (advanced)
     * @param envelope    gland envelope
     * @param generations number of bifurcating generations per main duct (≥ 1)
     */
    static DuctalTree grow(BreastMound mound, SplittableRandom rng, Envelope envelope, int generations) {
        DuctalTree t = new DuctalTree(rng, envelope, generations);
        int ducts = 7 + rng.nextInt(3);
        double[] root = {
            mound.nippleCentre[0] - 2 * mound.en[0],
            mound.nippleCentre[1] - 2 * mound.en[1],
            mound.nippleCentre[2] - 2 * mound.en[2]};
        double phase = rng.nextDouble() * 2 * Math.PI;
        for (int i = 0; i < ducts; i++) {
            double phi = phase + 2 * Math.PI * (i + 0.35 * rng.nextDouble()) / ducts;
            double[] target = mound.local(0.55 * mound.al * Math.cos(phi), 0.12 * mound.an,
                    0.55 * mound.az * Math.sin(phi) - 0.3 * mound.ptosisDropMm);
            double[] d = {target[0] - root[0], target[1] - root[1], target[2] - root[2]};
            double len = norm(d);
            scale(d, 1 / len);
            // The first, unbranched stretch runs through the retroareolar region.
            double[] start = root.clone();
            double trunk = len * (0.22 + 0.06 * rng.nextDouble());
            double[] end = {start[0] + trunk * d[0], start[1] + trunk * d[1], start[2] + trunk * d[2]};
            t.addSegment(start, end, 1.4);
            t.branch(end, d, len * 0.24, 1.4 * 0.78, 0);
        }
        return t;
    }

    private void branch(double[] p, double[] d, double len, double radius, int gen) {
        if (gen >= generations) {
            addLobules(p, d);
            return;
        }
        double[] axis = randomPerpendicular(d);
        double a1 = Math.toRadians(18 + 22 * rng.nextDouble());
        double a2 = -Math.toRadians(18 + 22 * rng.nextDouble());
        double[] d1 = rotate(d, axis, a1);
        double[] d2 = rotate(d, axis, a2);
        double l1 = len * (0.7 + 0.15 * rng.nextDouble());
        double l2 = len * (0.7 + 0.15 * rng.nextDouble());
        double[] e1 = grownEnd(p, d1, l1);
        double[] e2 = grownEnd(p, d2, l2);
        if (e1 == null && e2 == null) {
            addLobules(p, d);
            return;
        }
        addBranchPoint(p);
        if (e1 != null) {
            addSegment(p, e1, radius);
            branch(e1, d1, l1, radius * 0.78, gen + 1);
        }
        if (e2 != null) {
            addSegment(p, e2, radius);
            branch(e2, d2, l2, radius * 0.78, gen + 1);
        }
    }

    /** End of a child segment, shortened up to twice to stay in the envelope; null if it cannot. */
    private double[] grownEnd(double[] p, double[] d, double len) {
        double l = len;
        for (int attempt = 0; attempt < 3; attempt++) {
            double[] e = {p[0] + l * d[0], p[1] + l * d[1], p[2] + l * d[2]};
            if (envelope.skinDepth(e[0], e[1], e[2]) >= MIN_SKIN_DEPTH_MM
                    && envelope.chestWallDistance(e[0], e[1], e[2]) >= MIN_CHEST_WALL_MM) {
                return e;
            }
            l *= 0.5;
        }
        return null;
    }

    private void addLobules(double[] p, double[] d) {
        int n = 4 + rng.nextInt(4);
        for (int b = 0; b < n; b++) {
            double[] off = randomUnit();
            double r = 4.5 * rng.nextDouble();
            double x = p[0] + 2.5 * d[0] + r * off[0];
            double y = p[1] + 2.5 * d[1] + r * off[1];
            double z = p[2] + 2.5 * d[2] + r * off[2];
            addBlob(x, y, z, 1.8 + 1.4 * rng.nextDouble(), 0.9 + 0.6 * rng.nextDouble());
        }
    }

    private void addSegment(double[] a, double[] b, double radius) {
        if (7 * (segmentCount + 1) > segments.length) {
            segments = java.util.Arrays.copyOf(segments, segments.length * 2);
        }
        int o = 7 * segmentCount++;
        segments[o] = a[0];
        segments[o + 1] = a[1];
        segments[o + 2] = a[2];
        segments[o + 3] = b[0];
        segments[o + 4] = b[1];
        segments[o + 5] = b[2];
        segments[o + 6] = radius;
    }

    private void addBlob(double x, double y, double z, double sigma, double amp) {
        if (5 * (blobCount + 1) > blobs.length) {
            blobs = java.util.Arrays.copyOf(blobs, blobs.length * 2);
        }
        int o = 5 * blobCount++;
        blobs[o] = x;
        blobs[o + 1] = y;
        blobs[o + 2] = z;
        blobs[o + 3] = sigma;
        blobs[o + 4] = amp;
    }

    private void addBranchPoint(double[] p) {
        if (3 * (branchCount + 1) > branchPoints.length) {
            branchPoints = java.util.Arrays.copyOf(branchPoints, branchPoints.length * 2);
        }
        int o = 3 * branchCount++;
        branchPoints[o] = p[0];
        branchPoints[o + 1] = p[1];
        branchPoints[o + 2] = p[2];
    }

    private double[] randomUnit() {
        // Uniform on the sphere: z uniform in [-1, 1], azimuth uniform.
        double z = 2 * rng.nextDouble() - 1;
        double a = 2 * Math.PI * rng.nextDouble();
        double s = Math.sqrt(1 - z * z);
        return new double[] {s * StrictMath.cos(a), s * StrictMath.sin(a), z};
    }

    private double[] randomPerpendicular(double[] d) {
        while (true) {
            double[] v = randomUnit();
            double dot = v[0] * d[0] + v[1] * d[1] + v[2] * d[2];
            double[] a = {v[0] - dot * d[0], v[1] - dot * d[1], v[2] - dot * d[2]};
            double n = norm(a);
            if (n > 0.1) {
                scale(a, 1 / n);
                return a;
            }
        }
    }

    /** Rotation of unit d about a unit axis perpendicular to it: d cos α + (axis × d) sin α. */
    private static double[] rotate(double[] d, double[] axis, double angle) {
        double c = StrictMath.cos(angle);
        double s = StrictMath.sin(angle);
        double cx = axis[1] * d[2] - axis[2] * d[1];
        double cy = axis[2] * d[0] - axis[0] * d[2];
        double cz = axis[0] * d[1] - axis[1] * d[0];
        double[] r = {d[0] * c + cx * s, d[1] * c + cy * s, d[2] * c + cz * s};
        scale(r, 1 / norm(r));
        return r;
    }

    private static double norm(double[] v) {
        return Math.sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
    }

    private static void scale(double[] v, double f) {
        v[0] *= f;
        v[1] *= f;
        v[2] *= f;
    }
}
