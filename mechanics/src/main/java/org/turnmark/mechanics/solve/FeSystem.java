package org.turnmark.mechanics.solve;

import java.util.Arrays;

import org.turnmark.geom.Parallel;
import org.turnmark.mechanics.element.HexFormulation;
import org.turnmark.mechanics.element.HexKernel;
import org.turnmark.mechanics.element.ReferenceGeometry;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.HexMesh;

/**
 * The assembled finite-element system of one mesh: element materials, reference geometry, the
 * sparsity of the global tangent (3×3 node blocks) and an element colouring for parallel
 * assembly.
 *
 * <p>Parallel assembly: elements are greedily coloured in index order so that no two elements of
 * one colour share a node; colours are processed one after the other, elements of a colour in
 * parallel fixed blocks writing straight into the global arrays. Every global entry therefore
 * receives its contributions in colour order whatever the thread count: results are bit-identical.
 * Energies are summed per block, then over blocks in order. Not thread safe (owns workspaces).
 */
final class FeSystem {

    private static final int ELEM_BLOCK = 128;

    HexMesh mesh;
    ReferenceGeometry geo;
    final HexFormulation form;
    final double[] mu;
    final double[] kappa;
    final double[] rho;
    final int nodes;
    final int elements;
    final BlockCsr k;
    /** Σ_e (3μ_e + κ_e) V_e, mN·mm: the scale of element-energy round-off. */
    double energyScale;
    private final int[] elemBlock;
    private final int[] colorPtr;
    private final int[] colorElems;
    private final ThreadLocal<Work> work = ThreadLocal.withInitial(Work::new);

    private static final class Work {
        final HexKernel kernel = new HexKernel();
        final double[] ue = new double[24];
        final double[] fe = new double[24];
        final double[] ke = new double[576];
    }

    FeSystem(HexMesh mesh, MaterialTable mats, HexFormulation form) {
        this.mesh = mesh;
        this.form = form;
        this.nodes = mesh.nodeCount();
        this.elements = mesh.elementCount();
        int[] lab = mesh.label();
        mu = new double[elements];
        kappa = new double[elements];
        rho = new double[elements];
        for (int e = 0; e < elements; e++) {
            NeoHookeanMaterial m = mats.get(lab[e]);
            mu[e] = m.muKpa();
            kappa[e] = m.kappaKpa();
            rho[e] = m.densityKgM3();
        }
        geo = ReferenceGeometry.of(mesh);
        double scale = 0;
        for (int e = 0; e < elements; e++) {
            scale += (3 * mu[e] + kappa[e]) * geo.volume(e);
        }
        energyScale = scale;
        int[] hex = mesh.hex();
        // node → elements
        int[] nePtr = new int[nodes + 1];
        for (int v : hex) {
            nePtr[v + 1]++;
        }
        for (int n = 0; n < nodes; n++) {
            nePtr[n + 1] += nePtr[n];
        }
        int[] neIdx = new int[hex.length];
        int[] fill = Arrays.copyOf(nePtr, nodes);
        for (int i = 0; i < hex.length; i++) {
            neIdx[fill[hex[i]]++] = i / 8;
        }
        // node adjacency (sorted, including self)
        int[] rowPtr = new int[nodes + 1];
        int[] mark = new int[nodes];
        Arrays.fill(mark, -1);
        int[] buf = new int[512];
        int[][] rows = new int[nodes][];
        for (int n = 0; n < nodes; n++) {
            int cnt = 0;
            for (int q = nePtr[n]; q < nePtr[n + 1]; q++) {
                int e = neIdx[q];
                for (int a = 0; a < 8; a++) {
                    int m = hex[8 * e + a];
                    if (mark[m] != n) {
                        mark[m] = n;
                        if (cnt == buf.length) {
                            buf = Arrays.copyOf(buf, 2 * cnt);
                        }
                        buf[cnt++] = m;
                    }
                }
            }
            if (cnt == 0) {
                buf[cnt++] = n; // an unused node keeps its diagonal block (it is fixed later)
            }
            int[] r = Arrays.copyOf(buf, cnt);
            Arrays.sort(r);
            rows[n] = r;
            rowPtr[n + 1] = rowPtr[n] + cnt;
        }
        int[] col = new int[rowPtr[nodes]];
        for (int n = 0; n < nodes; n++) {
            System.arraycopy(rows[n], 0, col, rowPtr[n], rows[n].length);
        }
        k = new BlockCsr(nodes, 3, rowPtr, col);
        elemBlock = new int[64 * elements];
        for (int e = 0; e < elements; e++) {
            for (int a = 0; a < 8; a++) {
                for (int b = 0; b < 8; b++) {
                    elemBlock[64 * e + 8 * a + b] = k.find(hex[8 * e + a], hex[8 * e + b]);
                }
            }
        }
        // greedy colouring in element order
        long[] used = new long[nodes];
        int[] color = new int[elements];
        int nColors = 0;
        for (int e = 0; e < elements; e++) {
            long m = 0;
            for (int a = 0; a < 8; a++) {
                m |= used[hex[8 * e + a]];
            }
            int c = Long.numberOfTrailingZeros(~m);
            if (c >= 64) {
                throw new IllegalStateException("element colouring needs more than 64 colours at element " + e);
            }
            color[e] = c;
            nColors = Math.max(nColors, c + 1);
            for (int a = 0; a < 8; a++) {
                used[hex[8 * e + a]] |= 1L << c;
            }
        }
        colorPtr = new int[nColors + 1];
        for (int e = 0; e < elements; e++) {
            colorPtr[color[e] + 1]++;
        }
        for (int c = 0; c < nColors; c++) {
            colorPtr[c + 1] += colorPtr[c];
        }
        colorElems = new int[elements];
        int[] cf = Arrays.copyOf(colorPtr, nColors);
        for (int e = 0; e < elements; e++) {
            colorElems[cf[color[e]]++] = e;
        }
    }

    /**
     * Moves the reference configuration to new node positions (same topology): recomputes the
     * reference geometry, keeps sparsity and colouring.
     *
     * @throws org.turnmark.mechanics.element.InvertedElementException if an element is degenerate
     */
    void moveReference(double[] xyzMm) {
        HexMesh m = mesh.withNodes(xyzMm);
        ReferenceGeometry g = ReferenceGeometry.of(m);
        double scale = 0;
        for (int e = 0; e < elements; e++) {
            scale += (3 * mu[e] + kappa[e]) * g.volume(e);
        }
        mesh = m;
        geo = g;
        energyScale = scale;
    }

    /**
     * Dead external load for gravity: f_a = Σ_e ρ_e (∫ N_a dV) b with b = ρ-free acceleration
     * g·1e−6 (mN/mm³ per kg/m³).
     *
     * @param gravityMs2 gravitational acceleration, RAS, m/s²
     * @param out        nodal forces, mN, length 3·nodes (overwritten)
     */
    void gravityLoad(double[] gravityMs2, double[] out) {
        Arrays.fill(out, 0);
        int[] hex = mesh.hex();
        double[] nv = geo.nodeVolume();
        for (int e = 0; e < elements; e++) {
            double s = rho[e] * 1e-6;
            for (int a = 0; a < 8; a++) {
                int n = 3 * hex[8 * e + a];
                double f = s * nv[8 * e + a];
                out[n] += f * gravityMs2[0];
                out[n + 1] += f * gravityMs2[1];
                out[n + 2] += f * gravityMs2[2];
            }
        }
    }

    /**
     * Internal force, tangent and energy at displacement u.
     *
     * @param u    nodal displacements, mm, length 3·nodes (not modified)
     * @param fint out: internal force, mN (overwritten)
     * @param withK if true the tangent {@link #k} is overwritten
     * @param minDetF out: minDetF[0] = smallest det F at Gauss points
     * @return total strain energy, mN·mm; +∞ if an element is inverted
     */
    double assemble(double[] u, double[] fint, boolean withK, double[] minDetF) {
        Arrays.fill(fint, 0);
        if (withK) {
            Arrays.fill(k.val, 0);
        }
        int nColors = colorPtr.length - 1;
        int totalBlocks = 0;
        for (int c = 0; c < nColors; c++) {
            totalBlocks += Parallel.blockCount(colorPtr[c + 1] - colorPtr[c], ELEM_BLOCK);
        }
        double[] partE = new double[totalBlocks];
        double[] partJ = new double[totalBlocks];
        int offset = 0;
        final int[] hex = mesh.hex();
        final double[] kv = k.val;
        for (int c = 0; c < nColors; c++) {
            final int c0 = colorPtr[c];
            final int cn = colorPtr[c + 1] - c0;
            final int nb = Parallel.blockCount(cn, ELEM_BLOCK);
            final int off = offset;
            Parallel.forEachBlock(nb, 2000L * cn, blk -> {
                Work w = work.get();
                double en = 0;
                double mj = Double.POSITIVE_INFINITY;
                int to = Math.min(cn, (blk + 1) * ELEM_BLOCK);
                for (int q = blk * ELEM_BLOCK; q < to; q++) {
                    int e = colorElems[c0 + q];
                    gather(hex, e, u, w.ue);
                    double ee = w.kernel.evaluate(geo, e, w.ue, mu[e], kappa[e], form, w.fe, withK ? w.ke : null);
                    mj = Math.min(mj, w.kernel.minDetF());
                    en += ee;
                    if (ee == Double.POSITIVE_INFINITY) {
                        continue;
                    }
                    for (int a = 0; a < 8; a++) {
                        int n = 3 * hex[8 * e + a];
                        fint[n] += w.fe[3 * a];
                        fint[n + 1] += w.fe[3 * a + 1];
                        fint[n + 2] += w.fe[3 * a + 2];
                    }
                    if (withK) {
                        scatter(e, w.ke, kv);
                    }
                }
                partE[off + blk] = en;
                partJ[off + blk] = mj;
            });
            offset += nb;
        }
        double en = 0;
        double mj = Double.POSITIVE_INFINITY;
        for (int i = 0; i < totalBlocks; i++) {
            en += partE[i];
            mj = Math.min(mj, partJ[i]);
        }
        minDetF[0] = mj;
        return en;
    }

    /** Strain energy only (for line searches), mN·mm; +∞ if an element is inverted. */
    double energy(double[] u, double[] minDetF) {
        int nb = Parallel.blockCount(elements, ELEM_BLOCK);
        double[] partE = new double[nb];
        double[] partJ = new double[nb];
        final int[] hex = mesh.hex();
        Parallel.forEachBlock(nb, 400L * elements, blk -> {
            Work w = work.get();
            double en = 0;
            double mj = Double.POSITIVE_INFINITY;
            int to = Math.min(elements, (blk + 1) * ELEM_BLOCK);
            for (int e = blk * ELEM_BLOCK; e < to; e++) {
                gather(hex, e, u, w.ue);
                en += w.kernel.evaluate(geo, e, w.ue, mu[e], kappa[e], form, null, null);
                mj = Math.min(mj, w.kernel.minDetF());
            }
            partE[blk] = en;
            partJ[blk] = mj;
        });
        double en = 0;
        double mj = Double.POSITIVE_INFINITY;
        for (int i = 0; i < nb; i++) {
            en += partE[i];
            mj = Math.min(mj, partJ[i]);
        }
        minDetF[0] = mj;
        return en;
    }

    private static void gather(int[] hex, int e, double[] u, double[] ue) {
        for (int a = 0; a < 8; a++) {
            int n = 3 * hex[8 * e + a];
            ue[3 * a] = u[n];
            ue[3 * a + 1] = u[n + 1];
            ue[3 * a + 2] = u[n + 2];
        }
    }

    private void scatter(int e, double[] ke, double[] kv) {
        for (int a = 0; a < 8; a++) {
            for (int b = 0; b < 8; b++) {
                int v = 9 * elemBlock[64 * e + 8 * a + b];
                int r = 24 * 3 * a + 3 * b;
                kv[v] += ke[r];
                kv[v + 1] += ke[r + 1];
                kv[v + 2] += ke[r + 2];
                kv[v + 3] += ke[r + 24];
                kv[v + 4] += ke[r + 25];
                kv[v + 5] += ke[r + 26];
                kv[v + 6] += ke[r + 48];
                kv[v + 7] += ke[r + 49];
                kv[v + 8] += ke[r + 50];
            }
        }
    }
}
