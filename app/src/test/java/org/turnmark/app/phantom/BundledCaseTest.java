package org.turnmark.app.phantom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;

import org.junit.jupiter.api.Test;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * The bundled case {@code sample-cases/phantom-small} regenerated from its seed must match the committed
 * files, so the generator and the files never drift apart.
 *
 * <p>Tolerances: on one platform regeneration is bit-identical (seeded streams, fixed parallel blocks).
 * Across JVMs and CPUs, {@code Math.exp}/{@code Math.sqrt}-level differences of 1 ulp are allowed by the
 * Java specification; they can only flip a value that sits on a rounding boundary (an intensity on a
 * half-integer, a displacement on a half quantum, a label on its threshold). Hence: at most
 * {@link #FLIPPED_FRACTION} of the voxels may differ, intensities by at most one unit, displacements by at
 * most {@link #DISPLACEMENT_TOL_MM} (the interpolated finite-element solution converged to a relative
 * residual of 1e−6, i.e. ≪ 0.01 mm, plus one quantum). A deliberate change of the generator or of the
 * mechanics defaults it uses makes this test fail: then regenerate the bundled cases with the commands
 * in their READMEs ({@link #REGENERATE}).
 */
class BundledCaseTest {

    static final Path CASE = Path.of("..", "sample-cases", "phantom-small");
    /** Hint printed with a failure. */
    static final String REGENERATE = "if the generator or the mechanics changed on purpose, regenerate "
            + "sample-cases/phantom-* with the command in each README";
    /** Share of voxels allowed to flip across a rounding boundary between platforms. */
    private static final double FLIPPED_FRACTION = 1e-3;
    /** Displacement tolerance, mm (see class comment). */
    private static final double DISPLACEMENT_TOL_MM = 0.02;

    @Test
    void regeneratedCaseMatchesTheCommittedFiles() throws IOException {
        PhantomCase c = PhantomFixture.small();
        NiftiReader r = new NiftiReader();
        Grid3 g = c.grid();
        compare(r.readVolume(CASE.resolve("prone.nii.gz")).volume(), c.proneImage(), g, 1.0);
        compare(r.readVolume(CASE.resolve("supine.nii.gz")).volume(), c.supineImage(), g, 1.0);
        compare(r.readVolume(CASE.resolve("prone_labels.nii.gz")).volume(), toFloat(c.proneLabels()), g, 0);
        compare(r.readVolume(CASE.resolve("supine_labels.nii.gz")).volume(), toFloat(c.supineLabels()), g, 0);
        compare(r.readVolume(CASE.resolve("truth/reference_labels.nii.gz")).volume(), toFloat(c.referenceLabels()), g, 0);
        VectorField u = r.readVectorField(CASE.resolve("truth/" + PhantomWriter.DISPLACEMENT)).field();
        for (int d = 0; d < 3; d++) {
            float[] a = u.component(d);
            float[] b = c.displacement()[d];
            double max = 0;
            for (int v = 0; v < a.length; v++) {
                max = Math.max(max, Math.abs(a[v] - b[v]));
            }
            assertTrue(max <= DISPLACEMENT_TOL_MM, "displacement component " + d + " differs by " + max + " mm; "
                    + REGENERATE);
        }
        // Truth points in case.json equal the regenerated ones (JSON keeps 0.001 mm).
        JsonNode cj = new ObjectMapper().readTree(CASE.resolve("case.json").toFile());
        JsonNode l1 = cj.get("truth").get("lesions").get(0);
        for (int d = 0; d < 3; d++) {
            assertEquals(c.lesionProne()[d], l1.get("prone_ras_mm").get(d).asDouble(), DISPLACEMENT_TOL_MM);
            assertEquals(c.lesionSupine()[d], l1.get("supine_ras_mm").get(d).asDouble(), DISPLACEMENT_TOL_MM);
        }
        List<String> lines = Files.readAllLines(CASE.resolve("truth/landmarks.csv"));
        assertTrue(lines.get(0).startsWith("# RESEARCH USE ONLY"));
        assertEquals(c.landmarkProne().length / 3, lines.size() - 3);
    }

    @Test
    void everyBundledCaseFileIsAcceptedByThePlannersReader() throws IOException {
        try (var dirs = Files.list(CASE.getParent())) {
            List<Path> cases = dirs.filter(d -> Files.exists(d.resolve("case.json"))
                    && Files.exists(d.resolve("truth").resolve("truth.json"))).toList();
            assertTrue(cases.size() >= 2, "bundled phantom cases: " + cases);
            for (Path d : cases) {
                var cf = new org.turnmark.app.pipeline.CaseFileReader().read(d.resolve("case.json"));
                assertTrue(cf != null);
            }
        }
    }

    private static void compare(Volume file, float[] generated, Grid3 g, double tol) {
        assertTrue(file.grid().sameGrid(g, 1e-4), "grid " + file.grid() + " vs " + g);
        float[] a = file.data();
        int differ = 0;
        for (int v = 0; v < a.length; v++) {
            double d = Math.abs(a[v] - generated[v]);
            if (d > 0) {
                differ++;
                assertTrue(d <= tol, "voxel " + v + " differs by " + d + "; " + REGENERATE);
            }
        }
        assertTrue(differ <= FLIPPED_FRACTION * a.length, differ + " voxels differ; " + REGENERATE);
    }

    private static float[] toFloat(byte[] b) {
        float[] f = new float[b.length];
        for (int i = 0; i < b.length; i++) {
            f[i] = b[i] & 0xFF;
        }
        return f;
    }
}
