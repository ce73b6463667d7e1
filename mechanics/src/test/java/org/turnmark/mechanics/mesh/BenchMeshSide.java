package org.turnmark.mechanics.mesh;

import java.lang.management.ManagementFactory;
import java.lang.management.MemoryPoolMXBean;
import java.lang.management.MemoryType;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;
import java.util.Random;

import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;

/**
 * Benchmark of the mesh side of the mechanics model (not a test; run by the command in
 * docs/benchmarks.md): meshing a breast-sized synthetic label image, chest-wall contact, skin
 * smoothing, point location, the dense displacement field on the full image grid and the VTK export.
 * Prints a Markdown table row per phase: minimum wall time over the repeats, CPU time of that
 * repeat and the peak heap above the phase's start.
 */
public final class BenchMeshSide {

    private BenchMeshSide() {
    }

    /** A hemi-ellipsoidal breast (semi-axes 75, 60, 65 mm) on a chest-wall slab, 0.8 x 0.8 x 1 mm voxels. */
    static Grid3 grid() {
        return Grid3.axisAligned(240, 120, 160, 0.8, 0.8, 1.0, -96, -20, -80);
    }

    static byte[] labels(Grid3 g) {
        byte[] lab = new byte[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] p = g.worldOf(i, j, k);
                    int n = g.index(i, j, k);
                    if (p[1] < 0) {
                        lab[n] = 4;
                        continue;
                    }
                    double e = Math.pow(p[0] / 75, 2) + Math.pow(p[1] / 60, 2) + Math.pow(p[2] / 65, 2);
                    if (e <= 1) {
                        double g2 = Math.pow(p[0] / 35, 2) + Math.pow((p[1] - 20) / 25, 2) + Math.pow(p[2] / 30, 2);
                        double l2 = Math.pow(p[0] - 10, 2) + Math.pow(p[1] - 25, 2) + Math.pow(p[2] + 5, 2);
                        lab[n] = (byte) (l2 <= 36 ? 5 : e > 0.93 ? 3 : g2 <= 1 ? 2 : 1);
                    }
                }
            }
        }
        return lab;
    }

    private interface Phase {
        void run() throws Exception;
    }

    private static void time(String name, int repeats, Phase p) throws Exception {
        long best = Long.MAX_VALUE;
        long cpu = 0;
        long peak = 0;
        var bean = ManagementFactory.getThreadMXBean();
        for (int r = 0; r < repeats; r++) {
            System.gc();
            long before = heapUsed();
            resetPeaks();
            long c0 = bean.getCurrentThreadCpuTime();
            long t0 = System.nanoTime();
            p.run();
            long t = System.nanoTime() - t0;
            long c = bean.getCurrentThreadCpuTime() - c0;
            peak = Math.max(peak, peakHeap() - before);
            if (t < best) {
                best = t;
                cpu = c;
            }
        }
        System.out.printf(Locale.ROOT, "| %s | %d | %d | %d |%n", name, best / 1_000_000, cpu / 1_000_000,
                Math.max(0, peak) >> 20);
    }

    private static long heapUsed() {
        long s = 0;
        for (MemoryPoolMXBean b : ManagementFactory.getMemoryPoolMXBeans()) {
            if (b.getType() == MemoryType.HEAP) {
                s += b.getUsage().getUsed();
            }
        }
        return s;
    }

    private static void resetPeaks() {
        for (MemoryPoolMXBean b : ManagementFactory.getMemoryPoolMXBeans()) {
            b.resetPeakUsage();
        }
    }

    private static long peakHeap() {
        long s = 0;
        for (MemoryPoolMXBean b : ManagementFactory.getMemoryPoolMXBeans()) {
            if (b.getType() == MemoryType.HEAP) {
                s += b.getPeakUsage().getUsed();
            }
        }
        return s;
    }

    /** Usage: BenchMeshSide [elementMm] [repeats]. */
    public static void main(String[] args) throws Exception {
        double h = args.length > 0 ? Double.parseDouble(args[0]) : 5;
        int repeats = args.length > 1 ? Integer.parseInt(args[1]) : 3;
        Grid3 g = grid();
        byte[] lab = labels(g);
        LabelMesh lm = LabelMesher.mesh(g, lab, MesherConfig.of(h));
        HexMesh mesh = lm.mesh();
        MeshSurface surface = MeshSurface.of(mesh);
        ChestWallBoundary.ChestWall wall = ChestWallBoundary.find(mesh, surface, g, lab, h);
        // A smooth synthetic sag (mm), zero at the chest wall, for the map phases.
        double[] x = mesh.xyzMm();
        double[] u = new double[x.length];
        for (int n = 0; n < x.length / 3; n++) {
            double y = x[3 * n + 1];
            u[3 * n + 1] = -0.25 * y * Math.exp(-(x[3 * n] * x[3 * n] + x[3 * n + 2] * x[3 * n + 2]) / 4000);
            u[3 * n] = 0.05 * y;
        }
        System.out.printf(Locale.ROOT, "grid %dx%dx%d (%d voxels), h = %.1f mm: %d elements, %d nodes, %d surface "
                        + "faces, %d chest-wall nodes, threads %d%n", g.nx(), g.ny(), g.nz(), g.size(), h,
                mesh.elementCount(), mesh.nodeCount(), surface.faceCount(), wall.size(), Parallel.threads());
        System.out.println("| phase | min wall ms | CPU ms (calling thread) | peak heap above start, MiB |");
        System.out.println("|---|---:|---:|---:|");
        time("mesh (classify, pieces, nodes)", repeats, () -> LabelMesher.mesh(g, lab, MesherConfig.of(h)));
        time("boundary faces", repeats, () -> MeshSurface.of(mesh));
        time("chest-wall contact and normals", repeats, () -> ChestWallBoundary.find(mesh, surface, g, lab, h));
        boolean[] pinned = new boolean[mesh.nodeCount()];
        for (int n : wall.nodes()) {
            pinned[n] = true;
        }
        time("skin smoothing, 5 passes", repeats,
                () -> SkinSmoother.smooth(mesh, surface, pinned, SkinSmoother.Config.defaults(5)));
        ConfigurationMap inv = ConfigurationMap.inverse(mesh, u);
        time("locator build (deformed mesh)", repeats, () -> ConfigurationMap.inverse(mesh, u));
        Random rnd = new Random(1);
        double[] pts = new double[3 * 100_000];
        for (int i = 0; i < pts.length; i += 3) {
            pts[i] = -80 + 160 * rnd.nextDouble();
            pts[i + 1] = -10 + 80 * rnd.nextDouble();
            pts[i + 2] = -70 + 140 * rnd.nextDouble();
        }
        time("100 000 inverse point maps", repeats, () -> {
            PointMap.Evaluator ev = inv.evaluator();
            double[] o = new double[3];
            for (int i = 0; i < pts.length; i += 3) {
                ev.map(pts[i], pts[i + 1], pts[i + 2], o);
            }
        });
        time("dense field on the image grid, zero outside", repeats,
                () -> DisplacementFieldSampler.sample(inv, g, DenseDisplacement.Extrapolation.zero()));
        time("dense field, nearest-decay outside (L = 10 mm)", 1,
                () -> DisplacementFieldSampler.sample(inv, g, DenseDisplacement.Extrapolation.nearestDecay(10)));
        Path tmp = Files.createTempDirectory("bench-vtk");
        time("VTK binary write", repeats, () -> new VtkWriter(mesh).pointVectors("displacement_mm", u)
                .write(tmp.resolve("m.vtk"), VtkWriter.Encoding.BINARY));
        Files.deleteIfExists(tmp.resolve("m.vtk"));
        Files.deleteIfExists(tmp);
    }
}
