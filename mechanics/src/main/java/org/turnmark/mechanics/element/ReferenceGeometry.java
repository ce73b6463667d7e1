package org.turnmark.mechanics.element;

import org.turnmark.geom.Parallel;
import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.mechanics.mesh.TrilinearHex;

/**
 * Per-element data of the reference (undeformed) configuration of a hexahedral mesh for 2×2×2
 * Gauss integration: shape-function gradients ∂N_a/∂X at every Gauss point, the Gauss weights
 * times det(∂X/∂ξ), and the consistent body-force weights ∫ N_a dV.
 *
 * <p>Layout (flat): for element e, Gauss point g, node a, component i (X, Y, Z), the gradient is
 * {@code gradX[192e + 24g + 3a + i]} in 1/mm; the weight {@code weight[8e + g]} in mm³; the nodal
 * volume share {@code nodeVolume[8e + a]} = Σ_g w_g N_a(ξ_g) in mm³ (sums to the element volume).
 * Node order is VTK hexahedron order; Gauss point g has natural coordinates
 * ({@link #XI}[g], {@link #ETA}[g], {@link #ZETA}[g]) = (±1/√3, ±1/√3, ±1/√3) in node order.
 * Immutable after construction; thread safe.
 */
public final class ReferenceGeometry {

    /** Natural coordinates of the 8 nodes in VTK order. */
    static final double[] NODE_XI = {-1, 1, 1, -1, -1, 1, 1, -1};
    static final double[] NODE_ETA = {-1, -1, 1, 1, -1, -1, 1, 1};
    static final double[] NODE_ZETA = {-1, -1, -1, -1, 1, 1, 1, 1};

    private static final double G = 1 / Math.sqrt(3);
    /** Natural coordinates of the 8 Gauss points (node order scaled by 1/√3). */
    static final double[] XI = {-G, G, G, -G, -G, G, G, -G};
    /** See {@link #XI}. */
    static final double[] ETA = {-G, -G, G, G, -G, -G, G, G};
    /** See {@link #XI}. */
    static final double[] ZETA = {-G, -G, -G, -G, G, G, G, G};

    private static final int BLOCK = 512;

    private final double[] gradX;
    private final double[] weight;
    private final double[] nodeVolume;
    private final int elements;

    private ReferenceGeometry(double[] gradX, double[] weight, double[] nodeVolume, int elements) {
        this.gradX = gradX;
        this.weight = weight;
        this.nodeVolume = nodeVolume;
        this.elements = elements;
    }

    /**
     * Computes the reference geometry of {@code mesh} at its node positions.
     *
     * @throws InvertedElementException if det(∂X/∂ξ) ≤ 0 at a Gauss point (a degenerate or
     *                                   wrongly ordered element)
     */
    public static ReferenceGeometry of(HexMesh mesh) {
        return of(mesh.xyzMm(), mesh.hex());
    }

    /** As {@link #of(HexMesh)} with explicit reference node coordinates (length 3·nodes). */
    public static ReferenceGeometry of(double[] xyzMm, int[] hex) {
        int ne = hex.length / 8;
        double[] gradX = new double[192 * ne];
        double[] weight = new double[8 * ne];
        double[] nodeVolume = new double[8 * ne];
        double[] badDet = new double[Parallel.blockCount(ne, BLOCK)];
        int[] badElem = new int[badDet.length];
        java.util.Arrays.fill(badElem, -1);
        int nBlocks = Parallel.blockCount(ne, BLOCK);
        Parallel.forEachBlock(nBlocks, 64L * ne, blk -> {
            int from = blk * BLOCK;
            int to = Math.min(ne, from + BLOCK);
            double[] dxi = new double[24];
            for (int g = 0; g < 8; g++) {
                // shape-function derivatives in natural coordinates at Gauss point g
                for (int a = 0; a < 8; a++) {
                    double xa = NODE_XI[a];
                    double ya = NODE_ETA[a];
                    double za = NODE_ZETA[a];
                    dxi[3 * a] = 0.125 * xa * (1 + ya * ETA[g]) * (1 + za * ZETA[g]);
                    dxi[3 * a + 1] = 0.125 * ya * (1 + xa * XI[g]) * (1 + za * ZETA[g]);
                    dxi[3 * a + 2] = 0.125 * za * (1 + xa * XI[g]) * (1 + ya * ETA[g]);
                }
                for (int e = from; e < to; e++) {
                    // J0[i][α] = Σ_a X_a,i ∂N_a/∂ξ_α
                    double j00 = 0, j01 = 0, j02 = 0, j10 = 0, j11 = 0, j12 = 0, j20 = 0, j21 = 0, j22 = 0;
                    for (int a = 0; a < 8; a++) {
                        int n = 3 * hex[8 * e + a];
                        double x = xyzMm[n];
                        double y = xyzMm[n + 1];
                        double z = xyzMm[n + 2];
                        double d0 = dxi[3 * a];
                        double d1 = dxi[3 * a + 1];
                        double d2 = dxi[3 * a + 2];
                        j00 += x * d0;
                        j01 += x * d1;
                        j02 += x * d2;
                        j10 += y * d0;
                        j11 += y * d1;
                        j12 += y * d2;
                        j20 += z * d0;
                        j21 += z * d1;
                        j22 += z * d2;
                    }
                    double c00 = j11 * j22 - j12 * j21;
                    double c01 = j12 * j20 - j10 * j22;
                    double c02 = j10 * j21 - j11 * j20;
                    double det = j00 * c00 + j01 * c01 + j02 * c02;
                    if (!(det > 0)) {
                        int b = from / BLOCK;
                        if (badElem[b] < 0) {
                            badElem[b] = e;
                            badDet[b] = det;
                        }
                        continue;
                    }
                    double inv = 1 / det;
                    // inverse of J0: (J0⁻¹)[α][i] = cof(J0)[i][α] / det
                    double i00 = c00 * inv;
                    double i10 = c01 * inv;
                    double i20 = c02 * inv;
                    double i01 = (j02 * j21 - j01 * j22) * inv;
                    double i11 = (j00 * j22 - j02 * j20) * inv;
                    double i21 = (j01 * j20 - j00 * j21) * inv;
                    double i02 = (j01 * j12 - j02 * j11) * inv;
                    double i12 = (j02 * j10 - j00 * j12) * inv;
                    double i22 = (j00 * j11 - j01 * j10) * inv;
                    int base = 192 * e + 24 * g;
                    for (int a = 0; a < 8; a++) {
                        double d0 = dxi[3 * a];
                        double d1 = dxi[3 * a + 1];
                        double d2 = dxi[3 * a + 2];
                        // ∂N/∂X_i = Σ_α ∂N/∂ξ_α (J0⁻¹)[α][i]
                        gradX[base + 3 * a] = d0 * i00 + d1 * i10 + d2 * i20;
                        gradX[base + 3 * a + 1] = d0 * i01 + d1 * i11 + d2 * i21;
                        gradX[base + 3 * a + 2] = d0 * i02 + d1 * i12 + d2 * i22;
                    }
                    weight[8 * e + g] = det;
                    for (int a = 0; a < 8; a++) {
                        double na = 0.125 * (1 + NODE_XI[a] * XI[g]) * (1 + NODE_ETA[a] * ETA[g])
                                * (1 + NODE_ZETA[a] * ZETA[g]);
                        nodeVolume[8 * e + a] += det * na;
                    }
                }
            }
        });
        for (int b = 0; b < badElem.length; b++) {
            if (badElem[b] >= 0) {
                throw new InvertedElementException(badElem[b], badDet[b],
                        "reference element is degenerate or has the wrong node order");
            }
        }
        return new ReferenceGeometry(gradX, weight, nodeVolume, ne);
    }

    /**
     * Smallest det(∂X/∂ξ) over the 8 Gauss points of every element (mm³ per unit natural volume, ξ in
     * [−1, 1]³: one eighth of the element volume for an affine element; the same quantity as
     * {@link #weight()}), from {@link TrilinearHex#jacobian} on [0, 1]³ divided by 8. Negative or zero for a
     * degenerate or inverted element; unlike {@link #of(double[], int[])} this never throws.
     *
     * @param xyzMm node coordinates, 3 per node
     * @param hex   connectivity, 8 per element (VTK order)
     * @param out   receives one value per element
     */
    public static void minGaussDet(double[] xyzMm, int[] hex, double[] out) {
        int ne = hex.length / 8;
        if (out.length != ne) {
            throw new IllegalArgumentException("need " + ne + " output values, got " + out.length);
        }
        Parallel.forEachBlock(Parallel.blockCount(ne, BLOCK), 16L * ne, blk -> {
            double[] jac = new double[9];
            for (int e = blk * BLOCK, to = Math.min(ne, e + BLOCK); e < to; e++) {
                double min = Double.POSITIVE_INFINITY;
                for (int g = 0; g < 8; g++) {
                    // Gauss point ξ ∈ [−1, 1] → r = (1 + ξ) / 2; dr/dξ = 1/2 per axis, so det scales by 1/8
                    min = Math.min(min, TrilinearHex.jacobian(hex, e, xyzMm, 0.5 * (1 + XI[g]), 0.5 * (1 + ETA[g]),
                            0.5 * (1 + ZETA[g]), jac) / 8);
                }
                out[e] = min;
            }
        });
    }

    /** Number of elements. */
    public int elementCount() {
        return elements;
    }

    /** Shape-function gradients, layout in the class documentation; do not modify. */
    public double[] gradX() {
        return gradX;
    }

    /** Gauss weights × det(∂X/∂ξ), mm³, 8 per element; do not modify. */
    public double[] weight() {
        return weight;
    }

    /** Nodal volume shares Σ_g w_g N_a(ξ_g), mm³, 8 per element; do not modify. */
    public double[] nodeVolume() {
        return nodeVolume;
    }

    /** Reference volume of element e, mm³. */
    public double volume(int e) {
        double v = 0;
        for (int g = 0; g < 8; g++) {
            v += weight[8 * e + g];
        }
        return v;
    }
}
