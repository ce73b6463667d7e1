package org.turnmark.mechanics.mesh;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;

/**
 * Builds a hexahedral mesh from a label volume.
 *
 * <p>Labels: 0 air/outside, 1 fat, 2 fibroglandular, 3 skin, 4 chest wall (rigid, not meshed), 5
 * lesion; any other value is rejected. The elements are cells of a lattice aligned with the image's
 * voxel axes with edge length h = {@link MesherConfig#elementMm()} mm along each axis, whatever the
 * voxel spacing; the lattice starts at the outer corner of voxel (0, 0, 0) (voxel coordinate −½) and
 * covers the whole image. In voxel coordinates lattice point (a, b, c) sits at
 * (−½ + a·h/sx, −½ + b·h/sy, −½ + c·h/sz); its world position follows the image's voxel→world affine,
 * so oblique and sheared images are handled, and elements are parallelepipeds in world mm.
 *
 * <p>Classification: each cell is sampled at m per axis (m = ⌈h/spacing⌉ clamped to [2, 8]) regularly
 * spaced points, each taking the label of its nearest voxel (outside the image: 0). The cell is tissue
 * if the tissue fraction (labels 1, 2, 3, 5) ≥ {@code tissueFraction}, or if the lesion fraction ≥
 * {@code lesionFraction}. Its label is 5 if the lesion fraction ≥ {@code lesionFraction}, otherwise
 * the most frequent of 1, 2, 3, 5 (ties to the lower label). Nodes shared by cells are created once,
 * numbered in order of first use by elements in lattice order (c, then b, then a), so the mesh is
 * deterministic. Elements use VTK hexahedron order with positive volume; for a left-handed affine
 * (det &lt; 0) the lattice's first axis is traversed in reverse inside each element.
 *
 * <p>Connectivity: tissue cells sharing a face form a piece. Several pieces are an error reporting
 * all piece sizes, unless all but the largest hold together at most {@code maxDroppedFraction} of the
 * elements: then those are dropped and a warning is recorded. Memory is checked before the lattice is
 * allocated. Thread safe (stateless); classification runs in parallel over lattice slabs with
 * results independent of the thread count.
 */
public final class LabelMesher {

    /** Highest label value the model knows. */
    public static final int MAX_LABEL = 5;
    /** The chest-wall label (rigid, not meshed). */
    public static final int CHEST_WALL = 4;
    /** The lesion label (meshed, stiffer). */
    public static final int LESION = 5;

    /**
     * Rough memory an element costs in the solver afterwards (assembled sparse tangent of 81 3×3
     * blocks per node in double with indices, vectors, preconditioner): used to refuse sizes that
     * cannot be solved. An estimate, not a measurement of any one solver.
     */
    public static final long ESTIMATED_SOLVER_BYTES_PER_ELEMENT = 8_192L;

    private LabelMesher() {
    }

    /** As {@link #mesh(Grid3, byte[], MesherConfig)} for labels held as {@code int}. */
    public static LabelMesh mesh(Grid3 grid, int[] labels, MesherConfig config) {
        checkLength(grid, labels.length);
        byte[] b = new byte[labels.length];
        for (int n = 0; n < labels.length; n++) {
            int v = labels[n];
            if (v < 0 || v > MAX_LABEL) {
                throw unknownLabel(grid, n, v);
            }
            b[n] = (byte) v;
        }
        return mesh(grid, b, config);
    }

    /**
     * Meshes the tissue of a label volume.
     *
     * @param grid   the label image grid (voxel→world RAS+ mm)
     * @param labels one label per voxel, x fastest, values 0..5 (read as unsigned bytes); not modified
     * @param config element size and classification rules
     * @throws MeshInputException for unknown labels, no tissue, disconnected tissue, or a lattice or
     *                            mesh too large for the memory available
     */
    public static LabelMesh mesh(Grid3 grid, byte[] labels, MesherConfig config) {
        checkLength(grid, labels.length);
        for (int n = 0; n < labels.length; n++) {
            int v = labels[n] & 0xFF;
            if (v > MAX_LABEL) {
                throw unknownLabel(grid, n, v);
            }
        }
        double h = config.elementMm();
        double[] sp = grid.spacingMm();
        int[] dims = {grid.nx(), grid.ny(), grid.nz()};
        int[] cells = new int[3];
        double[] step = new double[3];
        int[] m = new int[3];
        for (int a = 0; a < 3; a++) {
            step[a] = h / sp[a];
            double c = Math.ceil(dims[a] * sp[a] / h - 1e-9);
            if (c > 1 << 20) {
                throw new MeshInputException(String.format(Locale.ROOT,
                        "element size %.4g mm is too small for an image %.1f mm wide along voxel axis %d",
                        h, dims[a] * sp[a], a));
            }
            cells[a] = Math.max(1, (int) c);
            m[a] = Math.max(2, Math.min(8, (int) Math.ceil(step[a] - 1e-9)));
        }
        long nCells = (long) cells[0] * cells[1] * cells[2];
        long nLattice = (long) (cells[0] + 1) * (cells[1] + 1) * (cells[2] + 1);
        // byte label + int piece id per cell, int node number per lattice point, plus BFS queue.
        long latticeBytes = nCells * 9 + nLattice * 4;
        if (nLattice > Integer.MAX_VALUE - 8 || latticeBytes > availableBytes()) {
            throw new MeshInputException(String.format(Locale.ROOT,
                    "element size %.4g mm needs a lattice of %d x %d x %d cells (%d MB), more than the %d MB "
                            + "of memory available; choose a larger element size",
                    h, cells[0], cells[1], cells[2], latticeBytes >> 20, availableBytes() >> 20));
        }
        byte[] cellLabel = classify(labels, dims, cells, step, m, config);

        int[] piece = new int[(int) nCells];
        int[] sizes = labelPieces(cellLabel, cells, piece);
        int total = 0;
        for (int s : sizes) {
            total += s;
        }
        if (total == 0) {
            throw new MeshInputException(String.format(Locale.ROOT,
                    "no tissue to mesh: no %.4g mm element has a tissue fraction >= %.2f (labels 1, 2, 3, 5) "
                            + "in a %d x %d x %d label image",
                    h, config.tissueFraction(), dims[0], dims[1], dims[2]));
        }
        int[] order = sortedPieceIds(sizes);
        int[] sortedSizes = new int[sizes.length];
        for (int n = 0; n < sizes.length; n++) {
            sortedSizes[n] = sizes[order[n]];
        }
        List<String> warnings = new ArrayList<>();
        int keep = order[0] + 1;
        int kept = sortedSizes[0];
        if (sizes.length > 1) {
            int dropped = total - kept;
            String list = sizesText(sortedSizes);
            if (dropped > config.maxDroppedFraction() * total) {
                throw new MeshInputException(String.format(Locale.ROOT,
                        "tissue is disconnected: %d separate pieces of %s elements (largest first); pieces other "
                                + "than the largest hold %.1f %% of the tissue, above the %.1f %% that may be "
                                + "dropped; check the labels",
                        sizes.length, list, 100.0 * dropped / total, 100 * config.maxDroppedFraction()));
            }
            warnings.add(String.format(Locale.ROOT,
                    "dropped %d small disconnected tissue piece(s) with %d of %d elements (%.2f %%); piece sizes %s",
                    sizes.length - 1, dropped, total, 100.0 * dropped / total, list));
        }
        long budget = availableBytes();
        if (kept > config.maxElements() || kept * ESTIMATED_SOLVER_BYTES_PER_ELEMENT > budget) {
            throw new MeshInputException(String.format(Locale.ROOT,
                    "element size %.4g mm gives %d tissue elements; the limit is %d elements and about %d fit "
                            + "in the %d MB of memory available; choose a larger element size",
                    h, kept, config.maxElements(), budget / ESTIMATED_SOLVER_BYTES_PER_ELEMENT, budget >> 20));
        }
        return build(grid, cellLabel, piece, keep, kept, cells, step, sortedSizes, warnings);
    }

    /** Memory the JVM can still hand out (bytes). */
    static long availableBytes() {
        Runtime rt = Runtime.getRuntime();
        return rt.maxMemory() - (rt.totalMemory() - rt.freeMemory());
    }

    private static byte[] classify(byte[] labels, int[] dims, int[] cells, double[] step, int[] m,
                                   MesherConfig config) {
        final int nx = dims[0];
        final int ny = dims[1];
        final int cx = cells[0];
        final int cy = cells[1];
        final int cz = cells[2];
        // Voxel index of sub-sample q of cell c along each axis (−1 outside the image), precomputed.
        final int[][] vox = new int[3][];
        for (int a = 0; a < 3; a++) {
            vox[a] = new int[cells[a] * m[a]];
            for (int c = 0; c < cells[a]; c++) {
                for (int q = 0; q < m[a]; q++) {
                    double p = -0.5 + (c + (q + 0.5) / m[a]) * step[a];
                    int v = (int) Math.floor(p + 0.5);
                    vox[a][c * m[a] + q] = v >= 0 && v < dims[a] ? v : -1;
                }
            }
        }
        final int mx = m[0];
        final int my = m[1];
        final int mz = m[2];
        final double samples = (double) mx * my * mz;
        final double tissueNeed = config.tissueFraction() * samples;
        final double lesionNeed = config.lesionFraction() * samples;
        final byte[] out = new byte[cx * cy * cz];
        Parallel.forEachBlock(cz, (long) cx * cy * cz * mx * my * mz, c -> {
            int[] count = new int[MAX_LABEL + 1];
            for (int b = 0; b < cy; b++) {
                for (int a = 0; a < cx; a++) {
                    Arrays.fill(count, 0);
                    for (int qz = 0; qz < mz; qz++) {
                        int k = vox[2][c * mz + qz];
                        for (int qy = 0; qy < my; qy++) {
                            int j = vox[1][b * my + qy];
                            if (k < 0 || j < 0) {
                                count[0] += mx;
                                continue;
                            }
                            int row = nx * (j + ny * k);
                            for (int qx = 0; qx < mx; qx++) {
                                int i = vox[0][a * mx + qx];
                                count[i < 0 ? 0 : labels[row + i] & 0xFF]++;
                            }
                        }
                    }
                    int tissue = count[1] + count[2] + count[3] + count[LESION];
                    byte lab = 0;
                    if (count[LESION] >= lesionNeed) {
                        lab = LESION;
                    } else if (tissue >= tissueNeed && tissue > 0) {
                        int best = 1;
                        for (int l = 2; l <= LESION; l++) {
                            if (l != CHEST_WALL && count[l] > count[best]) {
                                best = l;
                            }
                        }
                        lab = (byte) best;
                    }
                    out[a + cx * (b + cy * c)] = lab;
                }
            }
        });
        return out;
    }

    /** Labels face-connected tissue cells 1..P in {@code piece}; returns the P piece sizes. */
    private static int[] labelPieces(byte[] cellLabel, int[] cells, int[] piece) {
        int cx = cells[0];
        int cy = cells[1];
        int cz = cells[2];
        int[] queue = new int[cellLabel.length];
        int[] sizes = new int[16];
        int count = 0;
        for (int seed = 0; seed < cellLabel.length; seed++) {
            if (cellLabel[seed] == 0 || piece[seed] != 0) {
                continue;
            }
            int id = count + 1;
            int head = 0;
            int tail = 0;
            queue[tail++] = seed;
            piece[seed] = id;
            while (head < tail) {
                int q = queue[head++];
                int a = q % cx;
                int b = (q / cx) % cy;
                int c = q / (cx * cy);
                for (int d = 0; d < 6; d++) {
                    int na = a + (d == 0 ? -1 : d == 1 ? 1 : 0);
                    int nb = b + (d == 2 ? -1 : d == 3 ? 1 : 0);
                    int nc = c + (d == 4 ? -1 : d == 5 ? 1 : 0);
                    if (na < 0 || nb < 0 || nc < 0 || na >= cx || nb >= cy || nc >= cz) {
                        continue;
                    }
                    int nq = na + cx * (nb + cy * nc);
                    if (cellLabel[nq] != 0 && piece[nq] == 0) {
                        piece[nq] = id;
                        queue[tail++] = nq;
                    }
                }
            }
            if (count == sizes.length) {
                sizes = Arrays.copyOf(sizes, 2 * count);
            }
            sizes[count++] = tail;
        }
        return Arrays.copyOf(sizes, count);
    }

    /** Piece indices (0-based) by decreasing size, ties by first appearance. */
    private static int[] sortedPieceIds(int[] sizes) {
        long[] keyed = new long[sizes.length];
        for (int n = 0; n < sizes.length; n++) {
            keyed[n] = ((long) (Integer.MAX_VALUE - sizes[n]) << 32) | n;
        }
        Arrays.sort(keyed);
        int[] order = new int[sizes.length];
        for (int n = 0; n < sizes.length; n++) {
            order[n] = (int) keyed[n];
        }
        return order;
    }

    private static String sizesText(int[] sorted) {
        StringBuilder sb = new StringBuilder();
        int shown = Math.min(sorted.length, 10);
        for (int n = 0; n < shown; n++) {
            sb.append(n == 0 ? "" : ", ").append(sorted[n]);
        }
        if (sorted.length > shown) {
            sb.append(", ... (").append(sorted.length - shown).append(" more)");
        }
        return sb.toString();
    }

    private static LabelMesh build(Grid3 grid, byte[] cellLabel, int[] piece, int keep, int kept, int[] cells,
                                   double[] step, int[] sortedSizes, List<String> warnings) {
        int cx = cells[0];
        int cy = cells[1];
        int cz = cells[2];
        int lx = cx + 1;
        int ly = cy + 1;
        Affine3D v2w = grid.voxelToWorld();
        Affine3D latticeToVoxel = new Affine3D(step[0], 0, 0, -0.5, 0, step[1], 0, -0.5, 0, 0, step[2], -0.5);
        Grid3 lattice = new Grid3(lx, ly, cz + 1, v2w.compose(latticeToVoxel));
        boolean mirrored = v2w.determinant() < 0;
        int[] nodeOf = new int[lx * ly * (cz + 1)];
        Arrays.fill(nodeOf, -1);
        int[] hex = new int[8 * kept];
        int[] label = new int[kept];
        int[] elementCell = new int[kept];
        int[] labelCounts = new int[MAX_LABEL + 1];
        int nodes = 0;
        int e = 0;
        for (int c = 0; c < cz; c++) {
            for (int b = 0; b < cy; b++) {
                for (int a = 0; a < cx; a++) {
                    int cell = a + cx * (b + cy * c);
                    if (piece[cell] != keep) {
                        continue;
                    }
                    for (int n = 0; n < 8; n++) {
                        int da = (int) TrilinearHex.R[n];
                        if (mirrored) {
                            da = 1 - da;
                        }
                        int p = (a + da) + lx * ((b + (int) TrilinearHex.S[n]) + ly * (c + (int) TrilinearHex.T[n]));
                        if (nodeOf[p] < 0) {
                            nodeOf[p] = nodes++;
                        }
                        hex[8 * e + n] = nodeOf[p];
                    }
                    label[e] = cellLabel[cell];
                    labelCounts[label[e]]++;
                    elementCell[e] = cell;
                    e++;
                }
            }
        }
        double[] xyz = new double[3 * nodes];
        int[] nodeLatticePoint = new int[nodes];
        Affine3D l2w = lattice.voxelToWorld();
        double[] pt = new double[3];
        for (int p = 0; p < nodeOf.length; p++) {
            int n = nodeOf[p];
            if (n < 0) {
                continue;
            }
            pt[0] = p % lx;
            pt[1] = (p / lx) % ly;
            pt[2] = p / (lx * ly);
            l2w.applyPoint(pt, pt);
            xyz[3 * n] = pt[0];
            xyz[3 * n + 1] = pt[1];
            xyz[3 * n + 2] = pt[2];
            nodeLatticePoint[n] = p;
        }
        return new LabelMesh(new HexMesh(xyz, hex, label), lattice, elementCell, nodeLatticePoint, labelCounts,
                sortedSizes, List.copyOf(warnings));
    }

    private static void checkLength(Grid3 grid, int length) {
        if (length != grid.size()) {
            throw new IllegalArgumentException("label array must have one value per voxel (" + grid.size()
                    + "), got " + length);
        }
    }

    private static MeshInputException unknownLabel(Grid3 grid, int n, int v) {
        int i = n % grid.nx();
        int j = (n / grid.nx()) % grid.ny();
        int k = n / (grid.nx() * grid.ny());
        return new MeshInputException("unknown label " + v + " at voxel (" + i + ", " + j + ", " + k
                + "); the model knows 0 air, 1 fat, 2 fibroglandular, 3 skin, 4 chest wall, 5 lesion");
    }
}
