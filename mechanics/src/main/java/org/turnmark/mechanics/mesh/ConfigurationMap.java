package org.turnmark.mechanics.mesh;

/**
 * The map between two configurations of one mesh: a point in configuration A is located in the mesh
 * at A's node positions (element e, local coordinates ξ; {@link HexLocator}) and sent to
 * Σₐ Nₐ(ξ) xₐ^B, the same material point at B's node positions. This is the finite-element
 * deformation map (trilinear within each element), exactly invertible element by element: the inverse
 * is the same construction with A and B swapped, so forward ∘ inverse is the identity up to the
 * Newton tolerance wherever both are defined.
 *
 * <p>Typical uses: reference → loaded (A = X, B = X + u), loaded → reference (the inverse), and
 * prone → supine directly (A = prone node positions, B = supine node positions, both from the same
 * reference mesh). Node arrays are kept by reference and must not change. Thread safe.
 */
public final class ConfigurationMap implements PointMap {

    private final int[] hex;
    private final double[] fromXyz;
    private final double[] toXyz;
    private final HexLocator locator;

    /**
     * @param topology mesh supplying the connectivity (its own node positions are not used)
     * @param fromXyzMm node positions of the source configuration, length 3·nodes (world mm)
     * @param toXyzMm   node positions of the target configuration, length 3·nodes (world mm)
     */
    public ConfigurationMap(HexMesh topology, double[] fromXyzMm, double[] toXyzMm) {
        int n = topology.xyzMm().length;
        if (fromXyzMm.length != n || toXyzMm.length != n) {
            throw new IllegalArgumentException("both configurations need " + n + " coordinates, got "
                    + fromXyzMm.length + " and " + toXyzMm.length);
        }
        for (int i = 0; i < n; i++) {
            if (!Double.isFinite(fromXyzMm[i]) || !Double.isFinite(toXyzMm[i])) {
                throw new IllegalArgumentException("node " + i / 3 + " has a non-finite coordinate");
            }
        }
        this.hex = topology.hex();
        this.fromXyz = fromXyzMm;
        this.toXyz = toXyzMm;
        this.locator = new HexLocator(hex, fromXyzMm);
    }

    /** Reference → deformed for nodal displacements {@code uMm} (3 per node) on {@code reference}. */
    public static ConfigurationMap forward(HexMesh reference, double[] uMm) {
        return new ConfigurationMap(reference, reference.xyzMm(), displaced(reference, uMm));
    }

    /** Deformed → reference for nodal displacements {@code uMm} (3 per node) on {@code reference}. */
    public static ConfigurationMap inverse(HexMesh reference, double[] uMm) {
        return new ConfigurationMap(reference, displaced(reference, uMm), reference.xyzMm());
    }

    /** Node positions X + u as a new array. */
    public static double[] displaced(HexMesh reference, double[] uMm) {
        double[] x = reference.xyzMm();
        if (uMm.length != x.length) {
            throw new IllegalArgumentException("need 3 displacement components per node (" + x.length
                    + " values), got " + uMm.length);
        }
        double[] out = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            out[i] = x[i] + uMm[i];
        }
        return out;
    }

    /** The map in the opposite direction (builds a new locator). */
    public ConfigurationMap reversed() {
        return new ConfigurationMap(new HexMesh(toXyz, hex, new int[hex.length / 8]), toXyz, fromXyz);
    }

    /** The locator over the source configuration. */
    public HexLocator locator() {
        return locator;
    }

    @Override
    public Evaluator evaluator() {
        double[] rst = new double[3];
        double[] work = new double[12];
        return (x, y, z, out) -> {
            int e = locator.locate(x, y, z, rst, work);
            if (e == HexLocator.OUTSIDE) {
                return false;
            }
            TrilinearHex.interpolate(hex, e, toXyz, rst[0], rst[1], rst[2], out);
            return true;
        };
    }
}
