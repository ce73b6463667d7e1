package org.turnmark.mechanics.solve;

import java.util.Arrays;

/**
 * Displacement constraints per node: {@link Kind#FREE}, {@link Kind#FIXED} (zero displacement),
 * {@link Kind#SLIDING} along a plane with unit normal n (u·n = 0, tangential motion free; a
 * chest-wall node slides on the tangent plane of the wall at its reference position) or
 * {@link Kind#LINE} along a unit direction t (u ∥ t).
 *
 * <p>How the solver applies them: with the per-node projector P = I (free), 0 (fixed),
 * I − n nᵀ (sliding) or t tᵀ (line), each Newton system K Δu = −R is replaced by
 * (P K P + I − P) Δu = −P R. This eliminates the constrained directions exactly (no penalty
 * parameter, no change of matrix size or sparsity, and the matrix stays symmetric positive
 * definite); its solution satisfies (I − P) Δu = 0, so every iterate stays admissible.
 * The force residual reported and tested for convergence is P R (reactions excluded).
 *
 * <p>Mutable while being set up; not thread safe. The solver copies what it needs at the start of
 * a solve, so later changes do not affect a running solve.
 */
public final class NodeConstraints {

    /** Constraint kind of a node. */
    public enum Kind {
        /** No constraint. */
        FREE,
        /** All three displacement components zero. */
        FIXED,
        /** Normal displacement zero, tangential displacement free. */
        SLIDING,
        /** Displacement only along a unit direction (e.g. on the edge where two sliding planes meet). */
        LINE
    }

    private final byte[] kind;
    private final double[] normal;

    /** All {@code nodeCount} nodes free. */
    public NodeConstraints(int nodeCount) {
        if (nodeCount < 0) {
            throw new IllegalArgumentException("node count must be >= 0, got " + nodeCount);
        }
        kind = new byte[nodeCount];
        normal = new double[3 * nodeCount];
    }

    /** Number of nodes. */
    public int nodeCount() {
        return kind.length;
    }

    /** Fixes node {@code n} (zero displacement). Returns this. */
    public NodeConstraints fix(int n) {
        check(n);
        kind[n] = (byte) Kind.FIXED.ordinal();
        normal[3 * n] = 0;
        normal[3 * n + 1] = 0;
        normal[3 * n + 2] = 0;
        return this;
    }

    /** Frees node {@code n}. Returns this. */
    public NodeConstraints free(int n) {
        check(n);
        kind[n] = (byte) Kind.FREE.ordinal();
        normal[3 * n] = 0;
        normal[3 * n + 1] = 0;
        normal[3 * n + 2] = 0;
        return this;
    }

    /**
     * Lets node {@code n} slide: displacement along (nx, ny, nz) zero, tangential free. The normal is
     * normalised; it must be finite and non-zero. Returns this.
     */
    public NodeConstraints slide(int n, double nx, double ny, double nz) {
        check(n);
        double len = Math.sqrt(nx * nx + ny * ny + nz * nz);
        if (!(len > 1e-12) || !Double.isFinite(len)) {
            throw new IllegalArgumentException("sliding normal or line direction of node " + n + " must be finite and non-zero, got ("
                    + nx + ", " + ny + ", " + nz + ")");
        }
        kind[n] = (byte) Kind.SLIDING.ordinal();
        normal[3 * n] = nx / len;
        normal[3 * n + 1] = ny / len;
        normal[3 * n + 2] = nz / len;
        return this;
    }

    /**
     * Lets node {@code n} move only along (tx, ty, tz) (normalised; finite, non-zero). Returns this.
     */
    public NodeConstraints guide(int n, double tx, double ty, double tz) {
        slide(n, tx, ty, tz);
        kind[n] = (byte) Kind.LINE.ordinal();
        return this;
    }

    /** Constraint kind of node {@code n}. */
    public Kind kind(int n) {
        check(n);
        return Kind.values()[kind[n]];
    }

    /**
     * Unit sliding normal (sliding) or direction (line) of node {@code n}, zero otherwise, written
     * into {@code out[0..2]}.
     */
    public void normal(int n, double[] out) {
        check(n);
        out[0] = normal[3 * n];
        out[1] = normal[3 * n + 1];
        out[2] = normal[3 * n + 2];
    }

    /** Number of nodes of the given kind. */
    public int count(Kind k) {
        int c = 0;
        for (byte b : kind) {
            if (b == k.ordinal()) {
                c++;
            }
        }
        return c;
    }

    /** An independent copy. */
    public NodeConstraints copy() {
        NodeConstraints c = new NodeConstraints(kind.length);
        System.arraycopy(kind, 0, c.kind, 0, kind.length);
        System.arraycopy(normal, 0, c.normal, 0, normal.length);
        return c;
    }

    byte[] kinds() {
        return Arrays.copyOf(kind, kind.length);
    }

    double[] normals() {
        return Arrays.copyOf(normal, normal.length);
    }

    private void check(int n) {
        if (n < 0 || n >= kind.length) {
            throw new IndexOutOfBoundsException("node " + n + " outside [0, " + kind.length + ")");
        }
    }
}
