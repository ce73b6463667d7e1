package org.turnmark.mechanics.mesh;

import java.util.Arrays;

/**
 * The boundary of a hexahedral mesh: element faces not shared with another element.
 *
 * <p>Faces are stored flat, 4 nodes each ({@code faces[4f..4f+3]}), ordered counter-clockwise seen
 * from outside (outward normal by the right-hand rule) for positive-volume elements. Found without
 * hashing: faces are bucketed by their smallest node and compared within the bucket, so the result
 * is deterministic. Immutable by contract.
 *
 * @param faces       boundary faces, 4 node indices each
 * @param faceElement per boundary face, the element it belongs to
 * @param onSurface   per node, true if it lies on a boundary face
 */
public record MeshSurface(int[] faces, int[] faceElement, boolean[] onSurface) {

    /** Local node numbers of the 6 faces of a VTK hexahedron, outward counter-clockwise. */
    static final int[][] FACE_NODES = {
        {0, 3, 2, 1}, {4, 5, 6, 7}, {0, 4, 7, 3}, {1, 2, 6, 5}, {0, 1, 5, 4}, {3, 7, 6, 2}};

    /** Number of boundary faces. */
    public int faceCount() {
        return faceElement.length;
    }

    /** Finds the boundary of {@code mesh}. */
    public static MeshSurface of(HexMesh mesh) {
        int[] hex = mesh.hex();
        int ne = mesh.elementCount();
        int nn = mesh.nodeCount();
        int nf = 6 * ne;
        // Per face: its sorted 4 nodes, bucketed (CSR) by the smallest.
        int[] sorted = new int[4 * nf];
        int[] start = new int[nn + 1];
        int[] q = new int[4];
        for (int f = 0; f < nf; f++) {
            int e = f / 6;
            int[] loc = FACE_NODES[f % 6];
            for (int n = 0; n < 4; n++) {
                q[n] = hex[8 * e + loc[n]];
            }
            Arrays.sort(q);
            System.arraycopy(q, 0, sorted, 4 * f, 4);
            start[q[0] + 1]++;
        }
        for (int n = 0; n < nn; n++) {
            start[n + 1] += start[n];
        }
        int[] fill = Arrays.copyOf(start, nn);
        int[] bucket = new int[nf];
        for (int f = 0; f < nf; f++) {
            bucket[fill[sorted[4 * f]]++] = f;
        }
        boolean[] shared = new boolean[nf];
        for (int n = 0; n < nn; n++) {
            for (int x = start[n]; x < start[n + 1]; x++) {
                int f = bucket[x];
                for (int y = x + 1; y < start[n + 1]; y++) {
                    int g = bucket[y];
                    if (sorted[4 * f + 1] == sorted[4 * g + 1] && sorted[4 * f + 2] == sorted[4 * g + 2]
                            && sorted[4 * f + 3] == sorted[4 * g + 3]) {
                        shared[f] = true;
                        shared[g] = true;
                    }
                }
            }
        }
        int count = 0;
        for (int f = 0; f < nf; f++) {
            if (!shared[f]) {
                count++;
            }
        }
        int[] faces = new int[4 * count];
        int[] faceElement = new int[count];
        boolean[] onSurface = new boolean[nn];
        int c = 0;
        for (int f = 0; f < nf; f++) {
            if (shared[f]) {
                continue;
            }
            int e = f / 6;
            int[] loc = FACE_NODES[f % 6];
            for (int n = 0; n < 4; n++) {
                int node = hex[8 * e + loc[n]];
                faces[4 * c + n] = node;
                onSurface[node] = true;
            }
            faceElement[c] = e;
            c++;
        }
        return new MeshSurface(faces, faceElement, onSurface);
    }

    /**
     * Total boundary area (mm²), each face split into two triangles along the 0–2 diagonal (exact
     * for planar faces).
     */
    public double areaMm2(double[] xyzMm) {
        double area = 0;
        for (int f = 0; f < faceCount(); f++) {
            int p0 = 3 * faces[4 * f];
            int p1 = 3 * faces[4 * f + 1];
            int p2 = 3 * faces[4 * f + 2];
            int p3 = 3 * faces[4 * f + 3];
            area += triangleArea(xyzMm, p0, p1, p2) + triangleArea(xyzMm, p0, p2, p3);
        }
        return area;
    }

    private static double triangleArea(double[] x, int a, int b, int c) {
        double ux = x[b] - x[a];
        double uy = x[b + 1] - x[a + 1];
        double uz = x[b + 2] - x[a + 2];
        double vx = x[c] - x[a];
        double vy = x[c + 1] - x[a + 1];
        double vz = x[c + 2] - x[a + 2];
        double cx = uy * vz - uz * vy;
        double cy = uz * vx - ux * vz;
        double cz = ux * vy - uy * vx;
        return 0.5 * Math.sqrt(cx * cx + cy * cy + cz * cz);
    }
}
