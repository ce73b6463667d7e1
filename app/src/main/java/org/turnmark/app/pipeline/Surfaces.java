package org.turnmark.app.pipeline;

import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.mechanics.mesh.MeshSurface;

/**
 * The skin and chest-wall surfaces of a mesh as triangles (each boundary quad split in two), in any
 * configuration of its nodes, with closest-point queries. A boundary face whose four nodes are all
 * chest-wall nodes belongs to the chest wall; every other boundary face to the skin side.
 *
 * <p>Closest point on a triangle: Ericson, Real-Time Collision Detection (2005), §5.1.5. Queries
 * are brute force over the faces (a few thousand per model; called for a handful of points).
 * Immutable; thread safe.
 */
public final class Surfaces {

    private final int[] skinTri;
    private final int[] wallTri;

    private Surfaces(int[] skinTri, int[] wallTri) {
        this.skinTri = skinTri;
        this.wallTri = wallTri;
    }

    /** Splits the boundary of {@code mesh} into skin and chest-wall triangles. */
    public static Surfaces of(HexMesh mesh, int[] chestWallNodes) {
        MeshSurface s = MeshSurface.of(mesh);
        boolean[] wall = new boolean[mesh.nodeCount()];
        for (int n : chestWallNodes) {
            wall[n] = true;
        }
        int[] f = s.faces();
        int nf = s.faceCount();
        int nWall = 0;
        for (int q = 0; q < nf; q++) {
            if (wall[f[4 * q]] && wall[f[4 * q + 1]] && wall[f[4 * q + 2]] && wall[f[4 * q + 3]]) {
                nWall++;
            }
        }
        int[] skin = new int[6 * (nf - nWall)];
        int[] cw = new int[6 * nWall];
        int a = 0;
        int b = 0;
        for (int q = 0; q < nf; q++) {
            int n0 = f[4 * q];
            int n1 = f[4 * q + 1];
            int n2 = f[4 * q + 2];
            int n3 = f[4 * q + 3];
            int[] t = {n0, n1, n2, n0, n2, n3};
            if (wall[n0] && wall[n1] && wall[n2] && wall[n3]) {
                System.arraycopy(t, 0, cw, b, 6);
                b += 6;
            } else {
                System.arraycopy(t, 0, skin, a, 6);
                a += 6;
            }
        }
        return new Surfaces(skin, cw);
    }

    /** True if the model has chest-wall faces. */
    public boolean hasChestWall() {
        return wallTri.length > 0;
    }

    /** Closest skin point to {@code p} with nodes at {@code xyz}; returns the distance (mm), fills {@code out}. */
    public double closestSkin(double[] xyz, double[] p, double[] out) {
        return closest(skinTri, xyz, p, out);
    }

    /** Closest chest-wall point; returns the distance (mm), fills {@code out}. */
    public double closestChestWall(double[] xyz, double[] p, double[] out) {
        return closest(wallTri, xyz, p, out);
    }

    private static double closest(int[] tri, double[] xyz, double[] p, double[] out) {
        double best = Double.POSITIVE_INFINITY;
        double[] c = new double[3];
        for (int t = 0; t < tri.length; t += 3) {
            closestOnTriangle(p, xyz, tri[t], tri[t + 1], tri[t + 2], c);
            double dx = c[0] - p[0];
            double dy = c[1] - p[1];
            double dz = c[2] - p[2];
            double d2 = dx * dx + dy * dy + dz * dz;
            if (d2 < best) {
                best = d2;
                out[0] = c[0];
                out[1] = c[1];
                out[2] = c[2];
            }
        }
        return Math.sqrt(best);
    }

    /** Ericson 2005, §5.1.5: Voronoi-region tests on the triangle (a, b, c). */
    static void closestOnTriangle(double[] p, double[] xyz, int ia, int ib, int ic, double[] out) {
        double ax = xyz[3 * ia];
        double ay = xyz[3 * ia + 1];
        double az = xyz[3 * ia + 2];
        double abx = xyz[3 * ib] - ax;
        double aby = xyz[3 * ib + 1] - ay;
        double abz = xyz[3 * ib + 2] - az;
        double acx = xyz[3 * ic] - ax;
        double acy = xyz[3 * ic + 1] - ay;
        double acz = xyz[3 * ic + 2] - az;
        double apx = p[0] - ax;
        double apy = p[1] - ay;
        double apz = p[2] - az;
        double d1 = abx * apx + aby * apy + abz * apz;
        double d2 = acx * apx + acy * apy + acz * apz;
        if (d1 <= 0 && d2 <= 0) {
            set(out, ax, ay, az);
            return;
        }
        double bpx = p[0] - xyz[3 * ib];
        double bpy = p[1] - xyz[3 * ib + 1];
        double bpz = p[2] - xyz[3 * ib + 2];
        double d3 = abx * bpx + aby * bpy + abz * bpz;
        double d4 = acx * bpx + acy * bpy + acz * bpz;
        if (d3 >= 0 && d4 <= d3) {
            set(out, xyz[3 * ib], xyz[3 * ib + 1], xyz[3 * ib + 2]);
            return;
        }
        double vc = d1 * d4 - d3 * d2;
        if (vc <= 0 && d1 >= 0 && d3 <= 0) {
            double v = d1 / (d1 - d3);
            set(out, ax + v * abx, ay + v * aby, az + v * abz);
            return;
        }
        double cpx = p[0] - xyz[3 * ic];
        double cpy = p[1] - xyz[3 * ic + 1];
        double cpz = p[2] - xyz[3 * ic + 2];
        double d5 = abx * cpx + aby * cpy + abz * cpz;
        double d6 = acx * cpx + acy * cpy + acz * cpz;
        if (d6 >= 0 && d5 <= d6) {
            set(out, xyz[3 * ic], xyz[3 * ic + 1], xyz[3 * ic + 2]);
            return;
        }
        double vb = d5 * d2 - d1 * d6;
        if (vb <= 0 && d2 >= 0 && d6 <= 0) {
            double w = d2 / (d2 - d6);
            set(out, ax + w * acx, ay + w * acy, az + w * acz);
            return;
        }
        double va = d3 * d6 - d5 * d4;
        if (va <= 0 && (d4 - d3) >= 0 && (d5 - d6) >= 0) {
            double w = (d4 - d3) / ((d4 - d3) + (d5 - d6));
            double bx = xyz[3 * ib];
            double by = xyz[3 * ib + 1];
            double bz = xyz[3 * ib + 2];
            set(out, bx + w * (xyz[3 * ic] - bx), by + w * (xyz[3 * ic + 1] - by), bz + w * (xyz[3 * ic + 2] - bz));
            return;
        }
        double denom = 1.0 / (va + vb + vc);
        double v = vb * denom;
        double w = vc * denom;
        set(out, ax + abx * v + acx * w, ay + aby * v + acy * w, az + abz * v + acz * w);
    }

    private static void set(double[] out, double x, double y, double z) {
        out[0] = x;
        out[1] = y;
        out[2] = z;
    }
}
