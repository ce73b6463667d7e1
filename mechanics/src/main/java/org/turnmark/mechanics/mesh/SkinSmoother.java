package org.turnmark.mechanics.mesh;

import java.util.Arrays;

/**
 * Smooths the staircase of a voxel mesh's free surface without ever inverting an element.
 *
 * <p>Taubin's λ|μ smoothing (Taubin, SIGGRAPH 1995): alternating steps x ← x + λ Δx and x ← x + μ Δx
 * (λ &gt; 0 &gt; μ, |μ| slightly above λ), where Δx is the mean of a node's neighbours along boundary-face
 * edges minus the node; the pair removes high-frequency roughness with little shrinkage. Only free
 * surface nodes move (surface nodes not pinned, e.g. not on the chest wall); interior nodes stay.
 *
 * <p>Validity guard: moves are applied node by node in increasing node order; each move is accepted
 * only if every element containing the node keeps, at its 8 corners and 8 Gauss points, a Jacobian
 * determinant of at least {@code minDetRatio} times that element's smallest value before smoothing;
 * otherwise the move is halved up to {@value #BACKOFF_HALVINGS} times and then dropped. So no element
 * inverts or degenerates, and the result is deterministic. Stateless; thread safe.
 */
public final class SkinSmoother {

    /** Halvings of a rejected move before it is dropped. */
    public static final int BACKOFF_HALVINGS = 4;

    private SkinSmoother() {
    }

    /**
     * Smoothing settings.
     *
     * @param iterations  number of λ|μ pairs, ≥ 0
     * @param lambda      the shrinking step, in (0, 1)
     * @param mu          the inflating step, in (−1, −lambda)
     * @param minDetRatio smallest allowed det J relative to the element's value before smoothing, in (0, 1)
     */
    public record Config(int iterations, double lambda, double mu, double minDetRatio) {

        /** Validates the fields. */
        public Config {
            if (iterations < 0) {
                throw new IllegalArgumentException("smoothing iterations must be >= 0, got " + iterations);
            }
            if (!(lambda > 0 && lambda < 1)) {
                throw new IllegalArgumentException("lambda must be in (0, 1), got " + lambda);
            }
            if (!(mu > -1 && mu < -lambda)) {
                throw new IllegalArgumentException("mu must be in (-1, -lambda), got " + mu);
            }
            if (!(minDetRatio > 0 && minDetRatio < 1)) {
                throw new IllegalArgumentException("minDetRatio must be in (0, 1), got " + minDetRatio);
            }
        }

        /** λ = 0.5, μ = −0.53 (Taubin's usual pass-band pair), det J kept ≥ 30 % of its original value. */
        public static Config defaults(int iterations) {
            return new Config(iterations, 0.5, -0.53, 0.3);
        }
    }

    /**
     * Result of smoothing.
     *
     * @param mesh           the smoothed mesh (same topology and labels)
     * @param movedNodes     free surface nodes that were allowed to move
     * @param backedOff      node moves shortened or dropped by the validity guard
     * @param minDetRatio    smallest det J ratio (after / before) over all elements and sample points
     * @param maxMoveMm      largest total displacement of a node, mm
     */
    public record Result(HexMesh mesh, int movedNodes, int backedOff, double minDetRatio, double maxMoveMm) {
    }

    /**
     * Smooths the free surface of {@code mesh}.
     *
     * @param mesh    the mesh; not modified
     * @param surface its boundary ({@link MeshSurface#of})
     * @param pinned  per node, true if it must not move (may be null: nothing pinned beyond interior nodes)
     * @param config  settings
     */
    public static Result smooth(HexMesh mesh, MeshSurface surface, boolean[] pinned, Config config) {
        int nn = mesh.nodeCount();
        int ne = mesh.elementCount();
        int[] hex = mesh.hex();
        if (pinned != null && pinned.length != nn) {
            throw new IllegalArgumentException("need one pinned flag per node (" + nn + "), got " + pinned.length);
        }
        boolean[] free = new boolean[nn];
        int moved = 0;
        for (int n = 0; n < nn; n++) {
            free[n] = surface.onSurface()[n] && (pinned == null || !pinned[n]);
            moved += free[n] ? 1 : 0;
        }
        int[][] nbr = surfaceNeighbours(surface, nn, free);
        int[] elStart = new int[nn + 1];
        for (int v : hex) {
            elStart[v + 1]++;
        }
        for (int n = 0; n < nn; n++) {
            elStart[n + 1] += elStart[n];
        }
        int[] elOf = new int[hex.length];
        int[] fill = Arrays.copyOf(elStart, nn);
        for (int i = 0; i < hex.length; i++) {
            elOf[fill[hex[i]]++] = i / 8;
        }
        double[] x0 = mesh.xyzMm();
        double[] x = x0.clone();
        double[] jac = new double[9];
        double[] ref = new double[ne];
        for (int e = 0; e < ne; e++) {
            ref[e] = minDetJ(hex, e, x, jac);
        }
        double[] target = new double[3 * nn];
        // Scale accepted for each node's λ step; its μ step is capped by it, so that a guarded
        // shrinking step is not followed by a full inflating one (which would bias the volume upward).
        double[] pairScale = new double[nn];
        int backedOff = 0;
        for (int it = 0; it < 2 * config.iterations(); it++) {
            double f = (it % 2 == 0) ? config.lambda() : config.mu();
            for (int n = 0; n < nn; n++) {
                if (!free[n] || nbr[n].length == 0) {
                    continue;
                }
                double mx = 0;
                double my = 0;
                double mz = 0;
                for (int q : nbr[n]) {
                    mx += x[3 * q];
                    my += x[3 * q + 1];
                    mz += x[3 * q + 2];
                }
                double inv = 1.0 / nbr[n].length;
                target[3 * n] = f * (mx * inv - x[3 * n]);
                target[3 * n + 1] = f * (my * inv - x[3 * n + 1]);
                target[3 * n + 2] = f * (mz * inv - x[3 * n + 2]);
            }
            for (int n = 0; n < nn; n++) {
                if (!free[n] || nbr[n].length == 0) {
                    continue;
                }
                double ox = x[3 * n];
                double oy = x[3 * n + 1];
                double oz = x[3 * n + 2];
                boolean shrinkStep = it % 2 == 0;
                double s = shrinkStep ? 1 : pairScale[n];
                boolean ok = false;
                int tries = 0;
                while (s > 0) {
                    tries++;
                    x[3 * n] = ox + s * target[3 * n];
                    x[3 * n + 1] = oy + s * target[3 * n + 1];
                    x[3 * n + 2] = oz + s * target[3 * n + 2];
                    ok = true;
                    for (int k = elStart[n]; k < elStart[n + 1] && ok; k++) {
                        int e = elOf[k];
                        ok = minDetJ(hex, e, x, jac) >= config.minDetRatio() * ref[e];
                    }
                    if (ok || tries > BACKOFF_HALVINGS) {
                        break;
                    }
                    s *= 0.5;
                }
                if (tries > 1 || (tries == 1 && !ok)) {
                    backedOff++;
                }
                if (!ok) {
                    x[3 * n] = ox;
                    x[3 * n + 1] = oy;
                    x[3 * n + 2] = oz;
                }
                if (shrinkStep) {
                    pairScale[n] = ok ? s : 0;
                }
            }
        }
        double minRatio = Double.POSITIVE_INFINITY;
        for (int e = 0; e < ne; e++) {
            minRatio = Math.min(minRatio, minDetJ(hex, e, x, jac) / ref[e]);
        }
        double maxMove = 0;
        for (int n = 0; n < nn; n++) {
            double dx = x[3 * n] - x0[3 * n];
            double dy = x[3 * n + 1] - x0[3 * n + 1];
            double dz = x[3 * n + 2] - x0[3 * n + 2];
            maxMove = Math.max(maxMove, Math.sqrt(dx * dx + dy * dy + dz * dz));
        }
        return new Result(mesh.withNodes(x), moved, backedOff, minRatio, maxMove);
    }

    /** Smallest det J over the 8 corners and the 8 Gauss points of element e. */
    static double minDetJ(int[] hex, int e, double[] x, double[] jac) {
        double g0 = 0.5 - 0.5 / Math.sqrt(3);
        double g1 = 0.5 + 0.5 / Math.sqrt(3);
        double min = TrilinearHex.minCornerDetJ(hex, e, x, jac);
        for (int q = 0; q < 8; q++) {
            min = Math.min(min, TrilinearHex.jacobian(hex, e, x, (q & 1) == 0 ? g0 : g1, (q & 2) == 0 ? g0 : g1,
                    (q & 4) == 0 ? g0 : g1, jac));
        }
        return min;
    }

    /** For each free node, its distinct neighbours along boundary-face edges (sorted). */
    private static int[][] surfaceNeighbours(MeshSurface surface, int nn, boolean[] free) {
        int[] count = new int[nn];
        int[] faces = surface.faces();
        for (int f = 0; f < surface.faceCount(); f++) {
            for (int c = 0; c < 4; c++) {
                int a = faces[4 * f + c];
                int b = faces[4 * f + (c + 1) % 4];
                count[a]++;
                count[b]++;
            }
        }
        int[][] tmp = new int[nn][];
        int[] fill = new int[nn];
        for (int n = 0; n < nn; n++) {
            tmp[n] = free[n] ? new int[count[n]] : new int[0];
        }
        for (int f = 0; f < surface.faceCount(); f++) {
            for (int c = 0; c < 4; c++) {
                int a = faces[4 * f + c];
                int b = faces[4 * f + (c + 1) % 4];
                if (free[a]) {
                    tmp[a][fill[a]++] = b;
                }
                if (free[b]) {
                    tmp[b][fill[b]++] = a;
                }
            }
        }
        for (int n = 0; n < nn; n++) {
            int[] v = tmp[n];
            Arrays.sort(v);
            int k = 0;
            for (int i = 0; i < v.length; i++) {
                if (i == 0 || v[i] != v[i - 1]) {
                    v[k++] = v[i];
                }
            }
            tmp[n] = Arrays.copyOf(v, k);
        }
        return tmp;
    }
}
