package org.turnmark.mechanics.solve;

import org.turnmark.geom.Parallel;

/** Block-Jacobi preconditioner: the inverses of the b×b diagonal blocks (b = 3 or 6). */
final class BlockJacobi implements Preconditioner {

    double[] inv = new double[0];
    private int rows;
    private int b;

    @Override
    public void setup(BlockCsr a) {
        rows = a.rows;
        b = a.b;
        int bb = b * b;
        if (inv.length != rows * bb) {
            inv = new double[rows * bb];
        }
        Parallel.forEachBlock(Parallel.blockCount(rows, BlockCsr.ROW_BLOCK), (long) rows * bb * b, blk -> {
            int from = blk * BlockCsr.ROW_BLOCK;
            int to = Math.min(rows, from + BlockCsr.ROW_BLOCK);
            double[] m = new double[bb];
            for (int r = from; r < to; r++) {
                System.arraycopy(a.val, bb * a.diag[r], m, 0, bb);
                DenseOps.invertSpd(m, b, inv, bb * r, r);
            }
        });
    }

    @Override
    public void apply(double[] r, double[] z) {
        final int bs = b;
        final int bb = b * b;
        final double[] inv = this.inv;
        Parallel.forEachBlock(Parallel.blockCount(rows, BlockCsr.ROW_BLOCK), (long) rows * bb, blk -> {
            int from = blk * BlockCsr.ROW_BLOCK;
            int to = Math.min(rows, from + BlockCsr.ROW_BLOCK);
            if (bs == 3) {
                for (int n = from; n < to; n++) {
                    int o = 3 * n;
                    int v = 9 * n;
                    double r0 = r[o], r1 = r[o + 1], r2 = r[o + 2];
                    z[o] = inv[v] * r0 + inv[v + 1] * r1 + inv[v + 2] * r2;
                    z[o + 1] = inv[v + 3] * r0 + inv[v + 4] * r1 + inv[v + 5] * r2;
                    z[o + 2] = inv[v + 6] * r0 + inv[v + 7] * r1 + inv[v + 8] * r2;
                }
                return;
            }
            for (int n = from; n < to; n++) {
                int o = bs * n;
                int v = bb * n;
                for (int i = 0; i < bs; i++) {
                    double s = 0;
                    for (int j = 0; j < bs; j++) {
                        s += inv[v + bs * i + j] * r[o + j];
                    }
                    z[o + i] = s;
                }
            }
        });
    }
}
