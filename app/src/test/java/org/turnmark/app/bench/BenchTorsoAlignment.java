package org.turnmark.app.bench;

import java.nio.file.Path;
import java.util.Locale;

import org.turnmark.app.pipeline.CaseInputs;
import org.turnmark.app.phantom.PhantomAnatomy;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.mechanics.mesh.LabelMesher;
import org.turnmark.registration.diffeo.DiffeomorphicRegistration;
import org.turnmark.registration.diffeo.PreAlignment;
import org.turnmark.registration.diffeo.RegistrationConfig;
import org.turnmark.registration.diffeo.RegistrationInput;
import org.turnmark.registration.diffeo.RigidAligner;
import org.turnmark.registration.volume.Volume;

/**
 * Measures rigid alignments of a phantom's supine image to its prone image (which stands in for the
 * predicted supine shape) against the phantom's true torso placement: RMS and largest error over the
 * supine image's chest-wall voxels (label 4), mm. The true placement is {@link BenchCalibration#truePlacement}
 * (a Kabsch fit to the truth displacement on the chest wall). Whole image (the planner's current alignment) against
 * the chest wall alone (moving mask = the prone chest-wall label), coarse to fine from two starts.
 *
 * <pre>java -cp turnmark.jar:test-classes org.turnmark.app.bench.BenchTorsoAlignment CASE_DIR...</pre>
 */
public final class BenchTorsoAlignment {

    private BenchTorsoAlignment() {
    }

    public static void main(String[] args) throws Exception {
        System.out.println("case | alignment | chest-wall error RMS / max (mm) | seconds");
        for (String a : args) {
            run(Path.of(a));
        }
    }

    static double[] error(Affine3D a, Affine3D truth, Volume supineLabels) {
        Grid3 g = supineLabels.grid();
        float[] l = supineLabels.data();
        double ss = 0;
        double max = 0;
        long n = 0;
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    if (Math.round(l[g.index(i, j, k)]) != LabelMesher.CHEST_WALL) {
                        continue;
                    }
                    double[] y = g.worldOf(i, j, k);
                    double[] p = a.applyPoint(y[0], y[1], y[2]);
                    double[] q = truth.applyPoint(y[0], y[1], y[2]);
                    double d2 = (p[0] - q[0]) * (p[0] - q[0]) + (p[1] - q[1]) * (p[1] - q[1])
                            + (p[2] - q[2]) * (p[2] - q[2]);
                    ss += d2;
                    max = Math.max(max, Math.sqrt(d2));
                    n++;
                }
            }
        }
        return new double[] {Math.sqrt(ss / n), max};
    }

    static int levelFor(double targetMm, double spacingMm) {
        return Math.max(0, (int) Math.round(Math.log(targetMm / spacingMm) / Math.log(2)));
    }

    static void run(Path dir) throws Exception {
        Volume prone = CaseInputs.readImage("prone", dir.resolve("prone.nii.gz").toString());
        Volume supine = CaseInputs.readImage("supine", dir.resolve("supine.nii.gz").toString());
        Volume proneLabels = CaseInputs.readImage("labels", dir.resolve("prone_labels.nii.gz").toString());
        Volume supineLabels = CaseInputs.readImage("labels", dir.resolve("supine_labels.nii.gz").toString());
        // the true map from supine world to the body (prone) frame: the inverse of the torso placement
        Affine3D truth = BenchCalibration.truePlacement(dir).inverse();
        String name = dir.getFileName().toString();
        report(name, "identity", Affine3D.identity(), truth, supineLabels, 0);

        long t0 = System.nanoTime();
        RegistrationConfig rigid = RegistrationConfig.defaults().withPreAlignment(PreAlignment.RIGID).withIterations(0);
        Affine3D whole = new DiffeomorphicRegistration(rigid).register(new RegistrationInput(supine, prone, null, null,
                null, "supine", "prone"), null).preAlignment();
        report(name, "whole image (planner)", whole, truth, supineLabels, t0);

        float[] wall = new float[proneLabels.data().length];
        for (int n = 0; n < wall.length; n++) {
            wall[n] = Math.round(proneLabels.data()[n]) == LabelMesher.CHEST_WALL ? 1 : 0;
        }
        Volume wallMask = new Volume(proneLabels.grid(), wall);
        double h = supine.grid().spacingMm(0);
        int[] levels = {levelFor(16, h), levelFor(8, h), levelFor(4, h)};
        RegistrationConfig c = RegistrationConfig.defaults();
        RegistrationInput in = new RegistrationInput(supine, prone, null, wallMask, null, "supine", "prone");
        int[] four = {levelFor(32, h), levels[0], levels[1], levels[2]};
        t0 = System.nanoTime();
        RigidAligner.Result r = RigidAligner.align(c, in, Affine3D.identity(), levels, null);
        report(name, "chest wall, from identity " + rounds(r), r.fixedToMoving(), truth, supineLabels, t0);
        t0 = System.nanoTime();
        r = RigidAligner.align(c, in, whole, levels, null);
        report(name, "chest wall, from whole image " + rounds(r), r.fixedToMoving(), truth, supineLabels, t0);
        t0 = System.nanoTime();
        r = RigidAligner.align(c, in, Affine3D.identity(), four, 8, 1, null);
        report(name, "chest wall, lattice 8 mm about identity, 32-4 mm " + rounds(r), r.fixedToMoving(), truth,
                supineLabels, t0);
        t0 = System.nanoTime();
        r = RigidAligner.alignFromStarts(c, in, java.util.List.of(Affine3D.identity(), whole), four, 8, 1, null);
        report(name, "chest wall, lattice 8 mm about identity and whole image, 32-4 mm " + rounds(r),
                r.fixedToMoving(), truth, supineLabels, t0);
        t0 = System.nanoTime();
        r = RigidAligner.align(c, in, truth, levels, null);
        report(name, "chest wall, from truth " + rounds(r), r.fixedToMoving(), truth, supineLabels, t0);
    }

    private static String rounds(RigidAligner.Result r) {
        StringBuilder sb = new StringBuilder("[");
        for (RigidAligner.LevelOutcome o : r.levels()) {
            sb.append(String.format(Locale.ROOT, "%.0fmm:%d %.4f>%.4f ", o.spacingMm(), o.rounds(), o.costStart(),
                    o.costEnd()));
        }
        return sb.toString().trim() + "]";
    }

    private static void report(String name, String what, Affine3D a, Affine3D truth, Volume labels, long t0) {
        double[] e = error(a, truth, labels);
        // the residual rigid map in the body frame: truth⁻¹ ∘ a, as rotation (deg about x, y, z, small
        // angles) and translation at the torso centre (mm)
        double[] m = a.compose(truth.inverse()).toRowMajor();
        double[] c = {0, PhantomAnatomy.TORSO_CY_MM, 0};
        double[] tc = a.compose(truth.inverse()).applyPoint(c[0], c[1], c[2]);
        System.out.printf(Locale.ROOT, "%s | %s | %.2f / %.2f | %.1f | rot %.2f %.2f %.2f deg, shift %.1f %.1f %.1f mm%n",
                name, what, e[0], e[1], t0 == 0 ? 0 : (System.nanoTime() - t0) * 1e-9,
                Math.toDegrees(m[9] - m[6]) / 2, Math.toDegrees(m[2] - m[8]) / 2, Math.toDegrees(m[4] - m[1]) / 2,
                tc[0] - c[0], tc[1] - c[1], tc[2] - c[2]);
    }
}
