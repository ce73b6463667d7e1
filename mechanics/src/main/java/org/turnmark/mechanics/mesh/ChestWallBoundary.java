package org.turnmark.mechanics.mesh;

import java.util.Locale;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;

/**
 * The nodes where the tissue meets the rigid chest wall (label 4), with the chest-wall surface
 * normal at each.
 *
 * <p>Contact: a surface node of the mesh is a chest-wall node when a label-4 voxel centre lies within
 * {@code contactMm} of it (default h/2 + the largest voxel spacing: the majority rule of
 * {@link LabelMesher} moves the mesh boundary by up to h/2 from the labelled interface, and voxel
 * centres sit half a voxel inside it, plus half a voxel of slack).
 *
 * <p>Normal: the outward normal of the chest wall (pointing from the chest wall into the tissue) is
 * n ∝ −∇(G_σ ∗ χ)(x), the negative gradient of the label-4 indicator χ smoothed by a Gaussian of
 * width σ, evaluated exactly at the node as Σ_v χ(v) G_σ(x − v)(x − v) over voxel centres v within 2σ
 * (the Gaussian's derivative; truncation at 2σ keeps 86 % of its mass along the normal, and the
 * window is symmetric so a flat wall gives its exact normal). Default σ = max(h/2, largest spacing).
 * A node whose sum vanishes (a chest-wall sheet seen from both sides) gets a zero normal and is
 * counted in {@link ChestWall#unresolvedNormals()}; callers fix such nodes instead of letting them
 * slide. Stateless, thread safe; runs in parallel over fixed blocks of nodes.
 */
public final class ChestWallBoundary {

    private static final int BLOCK = 256;

    private ChestWallBoundary() {
    }

    /**
     * The chest-wall contact of a mesh.
     *
     * @param nodes              chest-wall node indices, increasing
     * @param normals            unit outward chest-wall normals, 3 per entry of {@code nodes} (RAS), or
     *                           (0, 0, 0) where unresolved
     * @param unresolvedNormals  number of nodes with a zero normal
     * @param contactMm          contact distance used (mm)
     * @param sigmaMm            smoothing width used for the normals (mm)
     */
    public record ChestWall(int[] nodes, double[] normals, int unresolvedNormals, double contactMm, double sigmaMm) {

        /** Number of chest-wall nodes. */
        public int size() {
            return nodes.length;
        }

        /**
         * The rim of the contact: chest-wall nodes that also lie on a boundary face not entirely made of
         * chest-wall nodes (where the tissue's free surface meets the chest wall). Fixing the rim while
         * the rest slides anchors the base and removes the rigid slide a flat or rotationally symmetric
         * wall would leave free.
         *
         * @return per node of the mesh, true on the rim
         */
        public boolean[] rim(MeshSurface surface, int nodeCount) {
            boolean[] wall = new boolean[nodeCount];
            for (int n : nodes) {
                wall[n] = true;
            }
            boolean[] rim = new boolean[nodeCount];
            int[] f = surface.faces();
            for (int q = 0; q < surface.faceCount(); q++) {
                if (wall[f[4 * q]] && wall[f[4 * q + 1]] && wall[f[4 * q + 2]] && wall[f[4 * q + 3]]) {
                    continue;
                }
                for (int a = 0; a < 4; a++) {
                    if (wall[f[4 * q + a]]) {
                        rim[f[4 * q + a]] = true;
                    }
                }
            }
            return rim;
        }
    }

    /** With the default contact distance and smoothing width for element size {@code elementMm}. */
    public static ChestWall find(HexMesh mesh, MeshSurface surface, Grid3 grid, byte[] labels, double elementMm) {
        double maxSp = Math.max(grid.spacingMm(0), Math.max(grid.spacingMm(1), grid.spacingMm(2)));
        return find(mesh, surface, grid, labels, elementMm / 2 + maxSp, Math.max(elementMm / 2, maxSp));
    }

    /**
     * Finds the chest-wall nodes and normals.
     *
     * @param mesh      the mesh (reference configuration, world mm)
     * @param surface   its boundary ({@link MeshSurface#of})
     * @param grid      the label image grid
     * @param labels    labels per voxel (x fastest), read as unsigned bytes; not modified
     * @param contactMm contact distance (mm), &gt; 0
     * @param sigmaMm   Gaussian width for the normals (mm), &gt; 0
     * @throws MeshInputException "floating body" if no surface node touches label 4
     */
    public static ChestWall find(HexMesh mesh, MeshSurface surface, Grid3 grid, byte[] labels, double contactMm,
                                 double sigmaMm) {
        if (labels.length != grid.size()) {
            throw new IllegalArgumentException("label array must have one value per voxel (" + grid.size()
                    + "), got " + labels.length);
        }
        if (!(contactMm > 0) || !(sigmaMm > 0)) {
            throw new IllegalArgumentException("contact distance and normal smoothing width must be > 0 mm, got "
                    + contactMm + " and " + sigmaMm);
        }
        boolean[] on = surface.onSurface();
        int nn = mesh.nodeCount();
        int[] candidates = new int[nn];
        int nc = 0;
        for (int n = 0; n < nn; n++) {
            if (on[n]) {
                candidates[nc++] = n;
            }
        }
        final int count = nc;
        final double radius = Math.max(contactMm, 2 * sigmaMm);
        final double[] xyz = mesh.xyzMm();
        final Affine3D w2v = grid.worldToVoxel();
        final Affine3D v2w = grid.voxelToWorld();
        double[] wm = w2v.toRowMajor();
        final int[] half = new int[3];
        for (int a = 0; a < 3; a++) {
            // A world ball of radius R spans R·|row a of the inverse| voxels along axis a.
            double rn = Math.sqrt(wm[4 * a] * wm[4 * a] + wm[4 * a + 1] * wm[4 * a + 1] + wm[4 * a + 2] * wm[4 * a + 2]);
            half[a] = (int) Math.ceil(radius * rn) + 1;
        }
        final double[] m = v2w.toRowMajor();
        final boolean[] contact = new boolean[count];
        final double[] normal = new double[3 * count];
        final int nx = grid.nx();
        final int ny = grid.ny();
        final int nz = grid.nz();
        final double c2 = contactMm * contactMm;
        final double r2 = 4 * sigmaMm * sigmaMm;
        final double inv2s2 = 1.0 / (2 * sigmaMm * sigmaMm);
        long work = (long) count * (2L * half[0] + 1) * (2L * half[1] + 1) * (2L * half[2] + 1);
        Parallel.forEachBlock(Parallel.blockCount(count, BLOCK), work, b -> {
            int from = b * BLOCK;
            int to = Math.min(count, from + BLOCK);
            double[] v = new double[3];
            for (int q = from; q < to; q++) {
                int p = 3 * candidates[q];
                double x = xyz[p];
                double y = xyz[p + 1];
                double z = xyz[p + 2];
                v[0] = x;
                v[1] = y;
                v[2] = z;
                w2v.applyPoint(v, v);
                int ci = (int) Math.round(v[0]);
                int cj = (int) Math.round(v[1]);
                int ck = (int) Math.round(v[2]);
                boolean touch = false;
                double sx = 0;
                double sy = 0;
                double sz = 0;
                for (int k = Math.max(0, ck - half[2]); k <= Math.min(nz - 1, ck + half[2]); k++) {
                    for (int j = Math.max(0, cj - half[1]); j <= Math.min(ny - 1, cj + half[1]); j++) {
                        int row = nx * (j + ny * k);
                        for (int i = Math.max(0, ci - half[0]); i <= Math.min(nx - 1, ci + half[0]); i++) {
                            if ((labels[row + i] & 0xFF) != LabelMesher.CHEST_WALL) {
                                continue;
                            }
                            double dx = x - (m[0] * i + m[1] * j + m[2] * k + m[3]);
                            double dy = y - (m[4] * i + m[5] * j + m[6] * k + m[7]);
                            double dz = z - (m[8] * i + m[9] * j + m[10] * k + m[11]);
                            double d2 = dx * dx + dy * dy + dz * dz;
                            if (d2 <= c2) {
                                touch = true;
                            }
                            if (d2 <= r2) {
                                double w = Math.exp(-d2 * inv2s2);
                                sx += w * dx;
                                sy += w * dy;
                                sz += w * dz;
                            }
                        }
                    }
                }
                contact[q] = touch;
                double len = Math.sqrt(sx * sx + sy * sy + sz * sz);
                // Relative guard: a sum this small against σ is cancellation, not a direction.
                if (touch && len > 1e-9 * sigmaMm) {
                    normal[3 * q] = sx / len;
                    normal[3 * q + 1] = sy / len;
                    normal[3 * q + 2] = sz / len;
                }
            }
        });
        int found = 0;
        for (int q = 0; q < count; q++) {
            if (contact[q]) {
                found++;
            }
        }
        if (found == 0) {
            throw new MeshInputException(String.format(Locale.ROOT,
                    "floating body: no surface node of the %d-element mesh lies within %.3g mm of a chest-wall "
                            + "voxel (label %d); the tissue must rest on the chest wall",
                    mesh.elementCount(), contactMm, LabelMesher.CHEST_WALL));
        }
        int[] nodes = new int[found];
        double[] normals = new double[3 * found];
        int unresolved = 0;
        int f = 0;
        for (int q = 0; q < count; q++) {
            if (!contact[q]) {
                continue;
            }
            nodes[f] = candidates[q];
            System.arraycopy(normal, 3 * q, normals, 3 * f, 3);
            if (normal[3 * q] == 0 && normal[3 * q + 1] == 0 && normal[3 * q + 2] == 0) {
                unresolved++;
            }
            f++;
        }
        return new ChestWall(nodes, normals, unresolved, contactMm, sigmaMm);
    }
}
