package org.turnmark.mechanics.solve;

import org.turnmark.geom.Parallel;

/**
 * Square sparse matrix of b×b blocks in compressed sparse row form (block size 3 for nodal
 * displacements, larger on multigrid coarse levels). Block (r, c) of block row r, position
 * k ∈ [rowPtr[r], rowPtr[r+1]), has column {@code col[k]} and values
 * {@code val[bb·k .. bb·k + bb − 1]} (row-major, bb = b²). Columns within a row are sorted.
 * Not thread safe for writes; {@link #multiply} is parallel over fixed row blocks and deterministic.
 */
final class BlockCsr {

    static final int ROW_BLOCK = 512;

    final int rows;
    final int b;
    final int[] rowPtr;
    final int[] col;
    final int[] diag;
    final double[] val;

    BlockCsr(int rows, int b, int[] rowPtr, int[] col) {
        this.rows = rows;
        this.b = b;
        this.rowPtr = rowPtr;
        this.col = col;
        this.val = new double[b * b * col.length];
        this.diag = new int[rows];
        for (int r = 0; r < rows; r++) {
            diag[r] = find(r, r);
            if (diag[r] < 0) {
                throw new IllegalStateException("block row " + r + " has no diagonal block");
            }
        }
    }

    /** Position of block (r, c), or −1 if it is not stored. */
    int find(int r, int c) {
        int lo = rowPtr[r];
        int hi = rowPtr[r + 1] - 1;
        while (lo <= hi) {
            int mid = (lo + hi) >>> 1;
            int v = col[mid];
            if (v < c) {
                lo = mid + 1;
            } else if (v > c) {
                hi = mid - 1;
            } else {
                return mid;
            }
        }
        return -1;
    }

    int size() {
        return rows * b;
    }

    /** y = A x; y must not alias x. Parallel over fixed row blocks. */
    void multiply(double[] x, double[] y) {
        final int bs = b;
        final int bb = b * b;
        final int[] rowPtr = this.rowPtr;
        final int[] col = this.col;
        final double[] val = this.val;
        Parallel.forEachBlock(Parallel.blockCount(rows, ROW_BLOCK), (long) col.length * bb, blk -> {
            int from = blk * ROW_BLOCK;
            int to = Math.min(rows, from + ROW_BLOCK);
            if (bs == 3) {
                for (int r = from; r < to; r++) {
                    double y0 = 0, y1 = 0, y2 = 0;
                    for (int k = rowPtr[r], end = rowPtr[r + 1]; k < end; k++) {
                        int c = 3 * col[k];
                        int v = 9 * k;
                        double x0 = x[c], x1 = x[c + 1], x2 = x[c + 2];
                        y0 += val[v] * x0 + val[v + 1] * x1 + val[v + 2] * x2;
                        y1 += val[v + 3] * x0 + val[v + 4] * x1 + val[v + 5] * x2;
                        y2 += val[v + 6] * x0 + val[v + 7] * x1 + val[v + 8] * x2;
                    }
                    y[3 * r] = y0;
                    y[3 * r + 1] = y1;
                    y[3 * r + 2] = y2;
                }
            } else if (bs == 6) {
                // coarse multigrid levels; same summation order as the general branch
                for (int r = from; r < to; r++) {
                    double y0 = 0, y1 = 0, y2 = 0, y3 = 0, y4 = 0, y5 = 0;
                    for (int k = rowPtr[r], end = rowPtr[r + 1]; k < end; k++) {
                        int c = 6 * col[k];
                        int v = 36 * k;
                        double x0 = x[c], x1 = x[c + 1], x2 = x[c + 2];
                        double x3 = x[c + 3], x4 = x[c + 4], x5 = x[c + 5];
                        y0 += val[v] * x0 + val[v + 1] * x1 + val[v + 2] * x2
                                + val[v + 3] * x3 + val[v + 4] * x4 + val[v + 5] * x5;
                        y1 += val[v + 6] * x0 + val[v + 7] * x1 + val[v + 8] * x2
                                + val[v + 9] * x3 + val[v + 10] * x4 + val[v + 11] * x5;
                        y2 += val[v + 12] * x0 + val[v + 13] * x1 + val[v + 14] * x2
                                + val[v + 15] * x3 + val[v + 16] * x4 + val[v + 17] * x5;
                        y3 += val[v + 18] * x0 + val[v + 19] * x1 + val[v + 20] * x2
                                + val[v + 21] * x3 + val[v + 22] * x4 + val[v + 23] * x5;
                        y4 += val[v + 24] * x0 + val[v + 25] * x1 + val[v + 26] * x2
                                + val[v + 27] * x3 + val[v + 28] * x4 + val[v + 29] * x5;
                        y5 += val[v + 30] * x0 + val[v + 31] * x1 + val[v + 32] * x2
                                + val[v + 33] * x3 + val[v + 34] * x4 + val[v + 35] * x5;
                    }
                    int yr = 6 * r;
                    y[yr] = y0;
                    y[yr + 1] = y1;
                    y[yr + 2] = y2;
                    y[yr + 3] = y3;
                    y[yr + 4] = y4;
                    y[yr + 5] = y5;
                }
            } else {
                for (int r = from; r < to; r++) {
                    int yr = bs * r;
                    for (int i = 0; i < bs; i++) {
                        y[yr + i] = 0;
                    }
                    for (int k = rowPtr[r], end = rowPtr[r + 1]; k < end; k++) {
                        int c = bs * col[k];
                        int v = bb * k;
                        for (int i = 0; i < bs; i++) {
                            double s = 0;
                            for (int j = 0; j < bs; j++) {
                                s += val[v + bs * i + j] * x[c + j];
                            }
                            y[yr + i] += s;
                        }
                    }
                }
            }
        });
    }
}
