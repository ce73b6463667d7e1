package org.turnmark.mechanics.mesh;

/**
 * An unstructured mesh of 8-node hexahedra in world millimetres (RAS+).
 *
 * <p>Storage is flat: node n has coordinates {@code xyzMm[3n..3n+2]}; element e has nodes
 * {@code hex[8e..8e+7]} in VTK hexahedron order (cell type 12): bottom face 0-1-2-3 counter-clockwise
 * seen from the top face, then top face 4-5-6-7 above 0-1-2-3, so that the element has positive
 * volume; {@code label[e]} is the tissue label of element e (1 fat, 2 fibroglandular, 3 skin, 5 lesion).
 * Arrays are kept by reference and must not be modified after construction. Immutable by contract,
 * so safe to share between threads.
 */
public final class HexMesh {

    private final double[] xyzMm;
    private final int[] hex;
    private final int[] label;

    /**
     * @param xyzMm node coordinates, length 3·nodes, finite, world mm
     * @param hex   connectivity, length 8·elements, indices in [0, nodes)
     * @param label tissue label per element, length elements
     */
    public HexMesh(double[] xyzMm, int[] hex, int[] label) {
        if (xyzMm.length % 3 != 0) {
            throw new IllegalArgumentException("node coordinate array length must be a multiple of 3, got " + xyzMm.length);
        }
        if (hex.length % 8 != 0) {
            throw new IllegalArgumentException("connectivity length must be a multiple of 8, got " + hex.length);
        }
        if (label.length != hex.length / 8) {
            throw new IllegalArgumentException("need one label per element (" + hex.length / 8 + "), got " + label.length);
        }
        int nodes = xyzMm.length / 3;
        for (int n = 0; n < xyzMm.length; n++) {
            if (!Double.isFinite(xyzMm[n])) {
                throw new IllegalArgumentException("node " + n / 3 + " has a non-finite coordinate " + xyzMm[n]);
            }
        }
        for (int n = 0; n < hex.length; n++) {
            if (hex[n] < 0 || hex[n] >= nodes) {
                throw new IllegalArgumentException("element " + n / 8 + " refers to node " + hex[n]
                        + " outside [0, " + nodes + ")");
            }
        }
        this.xyzMm = xyzMm;
        this.hex = hex;
        this.label = label;
    }

    public int nodeCount() {
        return xyzMm.length / 3;
    }

    public int elementCount() {
        return hex.length / 8;
    }

    /** Node coordinates (world mm), the array itself: do not modify. */
    public double[] xyzMm() {
        return xyzMm;
    }

    /** Connectivity (8 node indices per element), the array itself: do not modify. */
    public int[] hex() {
        return hex;
    }

    /** Tissue label per element, the array itself: do not modify. */
    public int[] label() {
        return label;
    }

    /** The same topology and labels at new node positions (for example a deformed configuration). */
    public HexMesh withNodes(double[] newXyzMm) {
        if (newXyzMm.length != xyzMm.length) {
            throw new IllegalArgumentException("need " + xyzMm.length + " coordinates, got " + newXyzMm.length);
        }
        return new HexMesh(newXyzMm, hex, label);
    }
}
