package org.turnmark.mechanics.solve;

import org.turnmark.geom.Parallel;

/**
 * Single-precision copy of a symmetric 3×3-block {@link BlockCsr} that stores only the diagonal and
 * upper block triangle: about half the blocks of the full pattern, so a product streams ≈ 13 MB
 * instead of ≈ 25 MB (single precision, full pattern) or ≈ 48 MB (double) for a 20,000-element
 * model. The products of the multigrid smoother and of the conjugate gradients are memory-bound,
 * so this is what they use on the finest level.
 *
 * <p>Product y = Ã x: block row r contributes Σ_{c ≥ r} Ã_rc x_c to y_r and Ã_rcᵀ x_r to y_c
 * (c &gt; r). Rows are split into fixed chunks of {@value #CHUNK_ROWS} block rows; each chunk writes
 * into its own buffer spanning its rows up to the largest column it touches, and y_i is the sum of
 * the buffers covering i in chunk order. The chunks depend only on the matrix, so the result is
 * bit-identical for any number of threads. Rounding each stored entry once keeps Ã exactly
 * symmetric. Not thread safe (the buffers are reused).
 */
final class UpperFloatMatrix {

    /**
     * Block rows per chunk: a chunk's buffer also spans the matrix bandwidth beyond its rows (one or
     * two layers of nodes of the voxel mesh, a few hundred), so chunks of thousands of rows keep the
     * buffer traffic (zeroing, scattering, summing) a small fraction of the matrix traffic while
     * leaving ≥ 10 chunks for the threads at 20,000 nodes.
     */
    static final int CHUNK_ROWS = 2048;

    private final BlockCsr a;
    final int rows;
    private final int[] upPtr;
    private final int[] upCol;
    /** Position of each stored block in the full matrix. */
    private final int[] src;
    private final float[] val;
    private final int chunks;
    /** Per chunk: end (exclusive) of the rows its buffer spans (it starts at the chunk's first row). */
    private final int[] bufEnd;
    /** Per chunk: offset of its buffer in {@link #buf} (3 values per row). */
    private final int[] bufOff;
    private final double[] buf;
    /** Per row: first chunk whose buffer covers it. */
    private final int[] firstChunk;

    /** Builds the structure for the pattern of {@code a} (block size 3, structurally symmetric). */
    UpperFloatMatrix(BlockCsr a) {
        if (a.b != 3) {
            throw new IllegalArgumentException("single-precision upper storage is for 3x3 blocks");
        }
        this.a = a;
        this.rows = a.rows;
        upPtr = new int[rows + 1];
        for (int r = 0; r < rows; r++) {
            upPtr[r + 1] = upPtr[r] + (a.rowPtr[r + 1] - a.diag[r]);
        }
        int nnz = upPtr[rows];
        upCol = new int[nnz];
        src = new int[nnz];
        for (int r = 0; r < rows; r++) {
            int q = upPtr[r];
            for (int k = a.diag[r]; k < a.rowPtr[r + 1]; k++) {
                upCol[q] = a.col[k];
                src[q] = k;
                q++;
            }
        }
        val = new float[9 * nnz];
        chunks = Parallel.blockCount(rows, CHUNK_ROWS);
        bufEnd = new int[chunks];
        bufOff = new int[chunks + 1];
        for (int c = 0; c < chunks; c++) {
            int from = c * CHUNK_ROWS;
            int to = Math.min(rows, from + CHUNK_ROWS);
            int end = to;
            for (int r = from; r < to; r++) {
                if (upPtr[r + 1] > upPtr[r]) {
                    end = Math.max(end, upCol[upPtr[r + 1] - 1] + 1);
                }
            }
            bufEnd[c] = end;
            bufOff[c + 1] = bufOff[c] + 3 * (end - from);
        }
        buf = new double[bufOff[chunks]];
        firstChunk = new int[rows];
        java.util.Arrays.fill(firstChunk, -1);
        for (int c = 0; c < chunks; c++) {
            for (int i = c * CHUNK_ROWS; i < bufEnd[c]; i++) {
                if (firstChunk[i] < 0) {
                    firstChunk[i] = c;
                }
            }
        }
    }

    /** The full matrix this copy is of. */
    BlockCsr source() {
        return a;
    }

    /** Stored blocks (diagonal and upper triangle). */
    int storedBlocks() {
        return upCol.length;
    }

    /** Copies the current values of the upper triangle of the source, rounded to float. */
    void refresh() {
        final double[] v = a.val;
        final int nnz = upCol.length;
        final int chunk = 8192;
        Parallel.forEachBlock(Parallel.blockCount(nnz, chunk), 9L * nnz, blk -> {
            int to = Math.min(nnz, (blk + 1) * chunk);
            for (int q = blk * chunk; q < to; q++) {
                int s = 9 * src[q];
                int d = 9 * q;
                for (int i = 0; i < 9; i++) {
                    val[d + i] = (float) v[s + i];
                }
            }
        });
    }

    /** y = Ã x with Ã the symmetric matrix whose upper triangle is stored; y must not alias x. */
    void multiply(double[] x, double[] y) {
        final int[] upPtr = this.upPtr;
        final int[] upCol = this.upCol;
        final float[] v = this.val;
        final double[] buf = this.buf;
        Parallel.forEachBlock(chunks, 18L * upCol.length, c -> {
            int from = c * CHUNK_ROWS;
            int to = Math.min(rows, from + CHUNK_ROWS);
            int off = bufOff[c] - 3 * from;   // buffer index of row i: off + 3 i
            java.util.Arrays.fill(buf, bufOff[c], bufOff[c + 1], 0);
            for (int r = from; r < to; r++) {
                int rr = 3 * r;
                double x0 = x[rr], x1 = x[rr + 1], x2 = x[rr + 2];
                int k = upPtr[r];
                int end = upPtr[r + 1];
                // diagonal block (first in the row)
                int d = 9 * k;
                double y0 = v[d] * x0 + v[d + 1] * x1 + v[d + 2] * x2;
                double y1 = v[d + 3] * x0 + v[d + 4] * x1 + v[d + 5] * x2;
                double y2 = v[d + 6] * x0 + v[d + 7] * x1 + v[d + 8] * x2;
                for (k++; k < end; k++) {
                    int cc = 3 * upCol[k];
                    int w = 9 * k;
                    double a00 = v[w], a01 = v[w + 1], a02 = v[w + 2];
                    double a10 = v[w + 3], a11 = v[w + 4], a12 = v[w + 5];
                    double a20 = v[w + 6], a21 = v[w + 7], a22 = v[w + 8];
                    double c0 = x[cc], c1 = x[cc + 1], c2 = x[cc + 2];
                    y0 += a00 * c0 + a01 * c1 + a02 * c2;
                    y1 += a10 * c0 + a11 * c1 + a12 * c2;
                    y2 += a20 * c0 + a21 * c1 + a22 * c2;
                    int t = off + cc;
                    buf[t] += a00 * x0 + a10 * x1 + a20 * x2;
                    buf[t + 1] += a01 * x0 + a11 * x1 + a21 * x2;
                    buf[t + 2] += a02 * x0 + a12 * x1 + a22 * x2;
                }
                int t = off + rr;
                buf[t] += y0;
                buf[t + 1] += y1;
                buf[t + 2] += y2;
            }
        });
        // y_i = Σ over the chunks whose buffer covers i, in chunk order
        Parallel.forEachBlock(chunks, 3L * rows, c -> {
            int from = c * CHUNK_ROWS;
            int to = Math.min(rows, from + CHUNK_ROWS);
            for (int i = from; i < to; i++) {
                double s0 = 0, s1 = 0, s2 = 0;
                for (int q = firstChunk[i]; q <= c; q++) {
                    if (i >= bufEnd[q]) {
                        continue;   // chunk q's buffer ends before row i
                    }
                    int t = bufOff[q] + 3 * (i - q * CHUNK_ROWS);
                    s0 += buf[t];
                    s1 += buf[t + 1];
                    s2 += buf[t + 2];
                }
                y[3 * i] = s0;
                y[3 * i + 1] = s1;
                y[3 * i + 2] = s2;
            }
        });
    }
}
