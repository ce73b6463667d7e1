package org.turnmark.registration.bench;

import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.lang.management.MemoryPoolMXBean;
import java.lang.management.MemoryType;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;
import java.util.SplittableRandom;

import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.geom.Progress;
import org.turnmark.registration.diffeo.DiffeomorphicRegistration;
import org.turnmark.registration.diffeo.LevelReport;
import org.turnmark.registration.diffeo.RegistrationConfig;
import org.turnmark.registration.diffeo.RegistrationInput;
import org.turnmark.registration.diffeo.RegistrationResult;
import org.turnmark.registration.metric.MetricKind;
import org.turnmark.registration.nifti.NiftiDatatype;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.resample.GaussianSmoothing;
import org.turnmark.registration.transform.DisplacementFields;
import org.turnmark.registration.transform.VelocityFields;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * Benchmark of the multi-resolution registration (not a test; run by the commands in
 * docs/benchmarks.md).
 *
 * <p>{@code --make DIR} writes an invented MR-like pair on a 160×160×96 grid of 1.2 × 1.2 × 1.5 mm
 * (smoothed seeded noise inside a soft ellipsoid, fixed seed) and a known smooth deformation
 * (exp of an analytic velocity field, up to ≈ 5 mm): {@code fixed.nii.gz}, {@code moving.nii.gz}
 * (the fixed image warped by the inverse map), {@code mask.nii.gz} and {@code truth.nii.gz} (the true
 * fixed → moving displacement).
 *
 * <p>{@code --run DIR [--metric lncc|ssd|mi] [--iterations a,b,c]} reads them, registers with the
 * default configuration (3 levels, LNCC) and prints per-level grid, iterations, stop reason and time,
 * the heap peak (sum of the heap pools' peak usage, which includes short-lived garbage), the total
 * time and the mean endpoint error inside the mask against the truth.
 */
public final class BenchRegistration {

    private static final int NX = 160;
    private static final int NY = 160;
    private static final int NZ = 96;

    private BenchRegistration() {
    }

    public static void main(String[] args) throws IOException {
        if (args.length >= 2 && args[0].equals("--make")) {
            make(Path.of(args[1]));
            return;
        }
        if (args.length >= 2 && args[0].equals("--run")) {
            MetricKind metric = MetricKind.LNCC;
            int[] its = null;
            for (int a = 2; a < args.length; a++) {
                if (args[a].equals("--metric")) {
                    metric = MetricKind.valueOf(args[++a].toUpperCase(Locale.ROOT));
                } else if (args[a].equals("--iterations")) {
                    String[] s = args[++a].split(",");
                    its = new int[s.length];
                    for (int q = 0; q < s.length; q++) {
                        its[q] = Integer.parseInt(s[q].trim());
                    }
                }
            }
            run(Path.of(args[1]), metric, its);
            return;
        }
        System.err.println("usage: BenchRegistration --make DIR | --run DIR [--metric lncc] [--iterations 60,40,20]");
        System.exit(2);
    }

    private static void make(Path dir) throws IOException {
        Files.createDirectories(dir);
        double hx = 1.2;
        double hz = 1.5;
        Grid3 g = Grid3.axisAligned(NX, NY, NZ, hx, hx, hz, -(NX - 1) * hx / 2, -(NY - 1) * hx / 2,
                -(NZ - 1) * hz / 2);
        int n = g.size();
        float[] noise = new float[n];
        SplittableRandom r = new SplittableRandom(2026);
        for (int q = 0; q < n; q++) {
            noise[q] = (float) r.nextGaussian();
        }
        float[] tex = new float[n];
        GaussianSmoothing.smooth(noise, tex, g, 2.5);
        float[] coarse = new float[n];
        GaussianSmoothing.smooth(noise, coarse, g, 8.0);
        float[] img = new float[n];
        float[] mask = new float[n];
        for (int k = 0; k < NZ; k++) {
            for (int j = 0; j < NY; j++) {
                for (int i = 0; i < NX; i++) {
                    double[] p = g.worldOf(i, j, k);
                    double e = Math.sqrt(p[0] * p[0] / (85.0 * 85.0) + p[1] * p[1] / (80.0 * 80.0)
                            + p[2] * p[2] / (62.0 * 62.0));
                    double env = 1 / (1 + Math.exp((e - 1) * 25));
                    int q = g.index(i, j, k);
                    img[q] = (float) (30 + env * (400 + 1500 * tex[q] + 3000 * coarse[q]));
                    mask[q] = e < 0.92 ? 1 : 0;
                }
            }
        }
        // Smooth analytic velocity (≈ 5 mm peak); truth = exp(v), moving = fixed ∘ exp(−v).
        VectorField v = VectorField.zeros(g);
        double k1 = 2 * Math.PI / 120;
        for (int k = 0; k < NZ; k++) {
            for (int j = 0; j < NY; j++) {
                for (int i = 0; i < NX; i++) {
                    double[] p = g.worldOf(i, j, k);
                    int q = g.index(i, j, k);
                    v.x()[q] = (float) (4 * Math.sin(k1 * p[1] + 0.4) * Math.cos(k1 * p[2]));
                    v.y()[q] = (float) (3 * Math.sin(k1 * p[2] + 1.1) * Math.cos(k1 * p[0]));
                    v.z()[q] = (float) (3 * Math.sin(k1 * p[0] + 2.0));
                }
            }
        }
        VectorField truth = VelocityFields.exp(v);
        VectorField inverse = VelocityFields.expInverse(v);
        Volume fixed = new Volume(g, img);
        Volume moving = DisplacementFields.warp(fixed, inverse);
        NiftiWriter.writeVolume(dir.resolve("fixed.nii.gz"), fixed);
        NiftiWriter.writeVolume(dir.resolve("moving.nii.gz"), moving);
        NiftiWriter.writeVolume(dir.resolve("mask.nii.gz"), new Volume(g, mask), NiftiDatatype.UINT8);
        NiftiWriter.writeDisplacementField(dir.resolve("truth.nii.gz"), truth, "fixed->moving");
        System.out.printf(Locale.ROOT, "wrote %dx%dx%d pair to %s (max true displacement %.2f mm)%n", NX, NY, NZ,
                dir, DisplacementFields.maxNormMm(truth));
    }

    private static void run(Path dir, MetricKind metric, int[] its) throws IOException {
        long t0 = System.nanoTime();
        NiftiReader reader = new NiftiReader();
        Volume fixed = reader.readVolume(dir.resolve("fixed.nii.gz")).volume();
        Volume moving = reader.readVolume(dir.resolve("moving.nii.gz")).volume();
        Volume mask = reader.readVolume(dir.resolve("mask.nii.gz")).volume();
        VectorField truth = reader.readVectorField(dir.resolve("truth.nii.gz")).field();
        double read = (System.nanoTime() - t0) * 1e-9;
        RegistrationConfig cfg = RegistrationConfig.defaults().withMetric(metric);
        if (its != null) {
            cfg = cfg.withIterations(its);
        }
        resetPeaks();
        RegistrationResult r = new DiffeomorphicRegistration(cfg).register(
                new RegistrationInput(fixed, moving, mask, null, null, "fixed", "moving"), Progress.NONE);
        double peakMiB = heapPeakBytes() / (1024.0 * 1024.0);
        System.out.printf(Locale.ROOT, "threads %d, metric %s, grid %dx%dx%d, read %.2f s%n", Parallel.threads(),
                metric, NX, NY, NZ, read);
        System.out.println("| level | grid | spacing mm | iterations | stop | cost before | cost after | time s |");
        System.out.println("|---|---|---|---|---|---|---|---|");
        for (LevelReport l : r.levels()) {
            double[] s = l.spacingMm();
            System.out.printf(Locale.ROOT, "| %d | %dx%dx%d | %.1f×%.1f×%.1f | %d | %s | %.4f | %.4f | %.2f |%n",
                    l.level(), l.nx(), l.ny(), l.nz(), s[0], s[1], s[2], l.iterations(),
                    l.stopReason().name().toLowerCase(Locale.ROOT), l.costBefore(), l.costAfter(), l.seconds());
        }
        double before = 0;
        double after = 0;
        int c = 0;
        for (int q = 0; q < mask.data().length; q++) {
            if (mask.data()[q] > 0.5f) {
                before += Math.sqrt(sq(truth.x()[q]) + sq(truth.y()[q]) + sq(truth.z()[q]));
                after += Math.sqrt(sq(truth.x()[q] - r.displacement().x()[q]) + sq(truth.y()[q] - r.displacement().y()[q])
                        + sq(truth.z()[q] - r.displacement().z()[q]));
                c++;
            }
        }
        System.out.printf(Locale.ROOT, "registration %.2f s, heap peak %.0f MiB, mean endpoint error in mask %.3f mm "
                        + "(before %.3f mm), min det J %.3f, %.4f %% det J <= 0, improved %s%n", r.seconds(), peakMiB,
                after / c, before / c, r.jacobian().minDet(), r.jacobian().percentNonPositive(), r.improved());
        System.out.printf(Locale.ROOT, "whole run in process %.2f s%n", (System.nanoTime() - t0) * 1e-9);
    }

    private static double sq(double a) {
        return a * a;
    }

    private static void resetPeaks() {
        System.gc();
        for (MemoryPoolMXBean p : ManagementFactory.getMemoryPoolMXBeans()) {
            if (p.getType() == MemoryType.HEAP) {
                p.resetPeakUsage();
            }
        }
    }

    private static long heapPeakBytes() {
        long s = 0;
        for (MemoryPoolMXBean p : ManagementFactory.getMemoryPoolMXBeans()) {
            if (p.getType() == MemoryType.HEAP) {
                s += p.getPeakUsage().getUsed();
            }
        }
        return s;
    }
}
