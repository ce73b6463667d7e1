package org.turnmark.app.pipeline;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Random;

import org.turnmark.geom.Grid3;
import org.turnmark.registration.nifti.NiftiDatatype;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.volume.Volume;

/**
 * A small invented prone case for pipeline tests: a torso slab (chest wall, label 4) for y &lt; 0 and
 * a hemispherical left breast of radius 40 mm centred at x = −40 mm on it, with a 2.5 mm skin shell,
 * a fibroglandular sphere and a 5 mm lesion; T1-like intensities (fat bright) with a smooth bias
 * and seeded noise. 2.5 mm voxels.
 */
final class SyntheticCase {

    static final double SPACING_MM = 2.5;
    static final double[] LESION = {-30, 18, 5};
    static final double[] BREAST_CENTRE = {-40, 0, 0};
    static final double BREAST_RADIUS_MM = 40;

    private SyntheticCase() {
    }

    static Grid3 grid() {
        // x −100..60, y −30..50, z −55..55 mm.
        return Grid3.axisAligned(65, 33, 45, SPACING_MM, SPACING_MM, SPACING_MM, -100, -30, -55);
    }

    static Volume labels() {
        Grid3 g = grid();
        float[] l = new float[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] p = g.worldOf(i, j, k);
                    int v = g.index(i, j, k);
                    if (p[1] < 0) {
                        l[v] = Math.abs(p[0] + 20) <= 75 && Math.abs(p[2]) <= 52 ? 4 : 0;
                        continue;
                    }
                    double r = dist(p, BREAST_CENTRE);
                    if (r > BREAST_RADIUS_MM) {
                        continue;
                    }
                    l[v] = r > BREAST_RADIUS_MM - SPACING_MM ? 3 : 1;
                    if (dist(p, new double[] {-45, 12, -5}) < 16) {
                        l[v] = 2;
                    }
                    if (dist(p, LESION) < 5.5) {
                        l[v] = 5;
                    }
                }
            }
        }
        return new Volume(g, l);
    }

    static Volume image(Volume labels, long seed) {
        float[] value = {5, 100, 45, 70, 40, 30};
        Grid3 g = labels.grid();
        Random rnd = new Random(seed);
        float[] out = new float[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    int v = g.index(i, j, k);
                    double[] p = g.worldOf(i, j, k);
                    double bias = 1 + 0.15 * Math.sin(p[0] / 60.0) * Math.cos(p[2] / 70.0);
                    out[v] = (float) (value[(int) labels.data()[v]] * bias + 2 * rnd.nextGaussian());
                }
            }
        }
        return new Volume(g, out);
    }

    static double dist(double[] a, double[] b) {
        double dx = a[0] - b[0];
        double dy = a[1] - b[1];
        double dz = a[2] - b[2];
        return Math.sqrt(dx * dx + dy * dy + dz * dz);
    }

    /** Writes prone.nii.gz, labels.nii.gz and case.json (mechanics only) into {@code dir}; returns the case file. */
    static Path write(Path dir, int samples, boolean withLabels) throws IOException {
        Volume lab = labels();
        NiftiWriter.writeVolume(dir.resolve("prone.nii.gz"), image(lab, 3));
        NiftiWriter.writeVolume(dir.resolve("labels.nii.gz"), lab, NiftiDatatype.UINT8);
        String json = "{\"schema_version\": 1, \"case_id\": \"synthetic\", \"prone_image\": \"prone.nii.gz\","
                + (withLabels ? " \"labels\": \"labels.nii.gz\"," : "")
                + " \"laterality\": \"left\", \"lesions\": [{\"id\": \"L1\", \"position_ras_mm\": [-30, 18, 5],"
                + " \"radius_mm\": 7}], \"model\": {\"element_size_mm\": 7.5},"
                + " \"uncertainty\": {\"samples\": " + samples + "}}";
        Path c = dir.resolve("case.json");
        Files.writeString(c, json);
        return c;
    }
}
