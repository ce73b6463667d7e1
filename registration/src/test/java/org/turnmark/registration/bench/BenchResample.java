package org.turnmark.registration.bench;

import java.io.IOException;
import java.io.InputStream;
import java.lang.management.ManagementFactory;
import java.lang.management.MemoryPoolMXBean;
import java.lang.management.MemoryType;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Locale;
import java.util.SplittableRandom;
import java.util.zip.GZIPInputStream;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.registration.nifti.NiftiDatatype;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.resample.GaussianSmoothing;
import org.turnmark.registration.resample.Grids;
import org.turnmark.registration.resample.Interp;
import org.turnmark.registration.resample.Interpolation;
import org.turnmark.registration.resample.Outside;
import org.turnmark.registration.resample.Resampler;
import org.turnmark.registration.volume.Volume;
import org.turnmark.registration.volume.VolumeStatistics;

/**
 * Benchmark for image I/O and resampling (not a test; run by the command in docs/benchmarks.md).
 *
 * <p>Makes a synthetic 256×256×160 int16 volume (0.8 × 0.8 × 1.0 mm, LPS storage, an MR-like
 * ellipsoidal phantom with smooth texture and noise, fixed seed), writes it as {@code .nii.gz} and
 * {@code .nii}, then times: reading the {@code .nii.gz}; plain gzip decompression of the same file
 * (lower bound for reading it); reading the {@code .nii}; trilinear resampling to a 1 mm isotropic
 * grid covering the volume and to the original grid rotated by 15° about an oblique axis; cubic
 * B-spline resampling to 1 mm; Gaussian smoothing (σ = 2 mm); robust statistics. Each phase is
 * repeated and the minimum and median wall times are printed, with the process CPU time of the fastest
 * run and the phase's peak heap above its start (sum of the heap pools' peak usage after a GC and a
 * peak reset; an upper bound that includes short-lived garbage). The thread count is the common pool parallelism
 * ({@code -Djava.util.concurrent.ForkJoinPool.common.parallelism=N}).
 *
 * <p>Arguments: {@code [--repeats N] [--dir DIR]} (default 5 repeats, a fresh temporary folder).
 */
public final class BenchResample {

    private static final int NX = 256;
    private static final int NY = 256;
    private static final int NZ = 160;

    private BenchResample() {
    }

    public static void main(String[] args) throws IOException {
        int repeats = 5;
        Path dir = null;
        for (int a = 0; a < args.length; a++) {
            if (args[a].equals("--repeats")) {
                repeats = Integer.parseInt(args[++a]);
            } else if (args[a].equals("--dir")) {
                dir = Path.of(args[++a]);
            } else {
                throw new IllegalArgumentException("unknown argument " + args[a] + "; use [--repeats N] [--dir DIR]");
            }
        }
        if (dir == null) {
            dir = Files.createTempDirectory("turnmark-bench");
        }
        Files.createDirectories(dir);
        System.out.printf(Locale.ROOT, "# BenchResample: Parallel.threads()=%d, availableProcessors=%d, maxHeap=%d MiB, java %s%n",
                Parallel.threads(), Runtime.getRuntime().availableProcessors(),
                Runtime.getRuntime().maxMemory() >> 20, System.getProperty("java.version"));
        System.out.printf(Locale.ROOT, "# JVM flags: %s%n", ManagementFactory.getRuntimeMXBean().getInputArguments());
        System.out.printf(Locale.ROOT, "# system load average at start: %.2f%n",
                ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage());
        System.out.println("| phase | min wall ms | median wall ms | process CPU ms (fastest run) | peak heap above start MiB |");
        System.out.println("|---|---:|---:|---:|---:|");

        Volume phantom = phantom();
        Path gz = dir.resolve("bench-256x256x160-int16.nii.gz");
        Path nii = dir.resolve("bench-256x256x160-int16.nii");
        final Path gzFinal = gz;
        final Path niiFinal = nii;
        time("write .nii.gz (int16)", 1, () -> NiftiWriter.writeVolume(gzFinal, phantom, NiftiDatatype.INT16));
        time("write .nii (int16)", 1, () -> NiftiWriter.writeVolume(niiFinal, phantom, NiftiDatatype.INT16));
        System.out.printf(Locale.ROOT, "# sizes: .nii.gz %.1f MiB, .nii %.1f MiB, voxels %d%n",
                Files.size(gz) / 1048576.0, Files.size(nii) / 1048576.0, (long) NX * NY * NZ);

        NiftiReader reader = new NiftiReader();
        Volume[] read = new Volume[1];
        time("read .nii.gz", repeats, () -> read[0] = reader.readVolume(gzFinal).volume());
        time("gunzip only (same file, 64 KiB buffers)", repeats, () -> gunzip(gzFinal));
        time("read .nii (uncompressed)", repeats, () -> reader.readVolume(niiFinal).volume());
        if (!Arrays.equals(read[0].data(), phantom.data())) {
            throw new IllegalStateException("read-back voxels differ from the written phantom");
        }

        Volume moving = read[0];
        Grid3 iso = Grids.isotropicCovering(moving.grid(), 1.0);
        Grid3 rotated = Grids.rotatedAboutCentre(moving.grid(), 1, 0.5, 0.25, Math.toRadians(15));
        System.out.printf(Locale.ROOT, "# 1 mm grid %dx%dx%d (%d voxels); rotated grid %dx%dx%d%n",
                iso.nx(), iso.ny(), iso.nz(), (long) iso.size(), rotated.nx(), rotated.ny(), rotated.nz());
        Volume[] out = new Volume[1];
        time("trilinear -> 1 mm isotropic", repeats,
                () -> out[0] = Resampler.resample(moving, iso, null, null, Interp.LINEAR, Outside.CONSTANT));
        int hashIso = Arrays.hashCode(out[0].data());
        time("trilinear -> rotated 15 deg", repeats,
                () -> out[0] = Resampler.resample(moving, rotated, null, null, Interp.LINEAR, Outside.CONSTANT));
        int hashRotated = Arrays.hashCode(out[0].data());
        float[][] coeffs = new float[1][];
        time("cubic B-spline prefilter", repeats,
                () -> coeffs[0] = Interpolation.bsplineCoefficients(moving.data(), NX, NY, NZ));
        time("cubic B-spline -> 1 mm isotropic (incl. prefilter)", repeats,
                () -> out[0] = Resampler.resample(moving, iso, null, null, Interp.CUBIC_BSPLINE, Outside.CONSTANT));
        int hashCubic = Arrays.hashCode(out[0].data());
        float[] smooth = new float[moving.grid().size()];
        time("Gaussian smoothing sigma 2 mm", repeats,
                () -> GaussianSmoothing.smooth(moving.data(), smooth, moving.grid(), 2.0));
        VolumeStatistics[] st = new VolumeStatistics[1];
        time("statistics (min/max/mean/sd, 1/50/99 %)", repeats, () -> st[0] = VolumeStatistics.of(moving));
        System.out.printf(Locale.ROOT, "# statistics: min %.0f, max %.0f, p1 %.1f, p50 %.1f, p99 %.1f (intensity units)%n",
                st[0].min(), st[0].max(), st[0].percentile(1), st[0].percentile(50), st[0].percentile(99));
        // Equal hashes across thread counts show the outputs are bit-identical.
        System.out.printf(Locale.ROOT, "# output hashes: trilinear 1 mm %08x, rotated %08x, cubic %08x, smoothed %08x, coefficients %08x%n",
                hashIso, hashRotated, hashCubic, Arrays.hashCode(smooth), Arrays.hashCode(coeffs[0]));
    }

    /** A body-like phantom: an ellipsoid of textured "fat" with "gland" blobs, noisy air around it. */
    static Volume phantom() {
        // LPS storage as many scanners write it: i towards patient left, j posterior.
        Affine3D v2w = new Affine3D(-0.8, 0, 0, 102.0, 0, -0.8, 0, 110.0, 0, 0, 1.0, -80.0);
        Grid3 g = new Grid3(NX, NY, NZ, v2w);
        float[] d = new float[g.size()];
        SplittableRandom root = new SplittableRandom(20261202L);
        long[] seeds = new long[NZ];
        for (int k = 0; k < NZ; k++) {
            seeds[k] = root.nextLong();
        }
        Parallel.forEachBlock(NZ, (long) g.size(), k -> {
            SplittableRandom r = new SplittableRandom(seeds[k]);
            for (int j = 0; j < NY; j++) {
                for (int i = 0; i < NX; i++) {
                    double x = (i - NX / 2.0) / (NX * 0.42);
                    double y = (j - NY / 2.0) / (NY * 0.36);
                    double z = (k - NZ / 2.0) / (NZ * 0.45);
                    double rr = x * x + y * y + z * z;
                    double v;
                    if (rr < 1) {
                        double texture = Math.sin(0.11 * i + 0.7 * Math.sin(0.05 * k)) * Math.cos(0.13 * j)
                                + 0.5 * Math.sin(0.031 * (i + j + 2 * k));
                        v = 420 + 180 * texture + (texture > 0.8 ? 350 : 0);
                    } else {
                        v = 15;
                    }
                    v += 12 * r.nextGaussian();
                    d[i + NX * (j + NY * k)] = (float) Math.max(0, Math.rint(v));
                }
            }
        });
        return new Volume(g, d);
    }

    static long gunzip(Path p) throws IOException {
        byte[] buf = new byte[1 << 16];
        long n = 0;
        try (InputStream in = new GZIPInputStream(Files.newInputStream(p), 1 << 16)) {
            for (int r = in.read(buf); r >= 0; r = in.read(buf)) {
                n += r;
            }
        }
        return n;
    }

    @FunctionalInterface
    interface Work {
        void run() throws IOException;
    }

    static void time(String name, int repeats, Work w) throws IOException {
        long[] ns = new long[repeats];
        long[] cpu = new long[repeats];
        long peak = 0;
        com.sun.management.OperatingSystemMXBean os =
                (com.sun.management.OperatingSystemMXBean) ManagementFactory.getOperatingSystemMXBean();
        for (int t = 0; t < repeats; t++) {
            System.gc();
            for (MemoryPoolMXBean p : ManagementFactory.getMemoryPoolMXBeans()) {
                p.resetPeakUsage();
            }
            long base = heapUsed();
            long c0 = os.getProcessCpuTime();
            long t0 = System.nanoTime();
            w.run();
            ns[t] = System.nanoTime() - t0;
            cpu[t] = os.getProcessCpuTime() - c0;
            long pk = 0;
            for (MemoryPoolMXBean p : ManagementFactory.getMemoryPoolMXBeans()) {
                if (p.getType() == MemoryType.HEAP) {
                    pk += p.getPeakUsage().getUsed();
                }
            }
            peak = Math.max(peak, pk - base);
        }
        int best = 0;
        for (int t = 1; t < repeats; t++) {
            if (ns[t] < ns[best]) {
                best = t;
            }
        }
        long cpuOfBest = cpu[best];
        long[] sorted = ns.clone();
        Arrays.sort(sorted);
        System.out.printf(Locale.ROOT, "| %-50s | %8.0f | %8.0f | %8.0f | %7.0f |%n", name, sorted[0] / 1e6,
                sorted[repeats / 2] / 1e6, cpuOfBest / 1e6, peak / 1048576.0);
    }

    static long heapUsed() {
        long u = 0;
        for (MemoryPoolMXBean p : ManagementFactory.getMemoryPoolMXBeans()) {
            if (p.getType() == MemoryType.HEAP) {
                u += p.getUsage().getUsed();
            }
        }
        return u;
    }
}
