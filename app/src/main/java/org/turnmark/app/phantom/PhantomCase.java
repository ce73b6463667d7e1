package org.turnmark.app.phantom;

import org.turnmark.geom.Grid3;

/**
 * A generated case in memory: images, labels and truth, all on one image grid (RAS mm). Arrays are
 * kept by reference. Intensities are whole numbers (stored as int16); displacements are multiples of
 * {@link PhantomGenerator#DISPLACEMENT_QUANTUM_MM}.
 *
 * @param options              the options it was made with
 * @param anatomy              the reference anatomy
 * @param grid                 grid of every image
 * @param referenceLabels      labels of the gravity-free reference anatomy
 * @param proneLabels          labels of the prone image
 * @param supineLabels         labels of the supine image
 * @param proneImage           prone MR-like image (noisy)
 * @param supineImage          supine MR-like image (noisy)
 * @param proneNoiseSigma      noise σ of the prone image (same units as the image)
 * @param supineNoiseSigma     noise σ of the supine image
 * @param displacement         true prone → supine displacement, components x, y, z (mm) on the grid:
 *                             prone point p maps to supine point p + u(p)
 * @param lesionReference      lesion centroids, reference configuration (3 per lesion, mm)
 * @param lesionProne          lesion centroids, prone image (mm)
 * @param lesionSupine         lesion centroids, supine image (mm)
 * @param nippleReference      nipple tips, reference (3 per breast, mm)
 * @param nippleProne          nipple tips, prone image (mm)
 * @param nippleSupine         nipple tips, supine image (mm)
 * @param landmarkReference    duct branch points, reference (3 per landmark, mm)
 * @param landmarkProne        the same points in the prone image (mm)
 * @param landmarkSupine       the same points in the supine image (mm)
 * @param truth                the truth postures (maps, conditions and solver diagnostics)
 * @param seconds              wall time of the generation (s)
 */
public record PhantomCase(PhantomOptions options, PhantomAnatomy anatomy, Grid3 grid, byte[] referenceLabels,
                          byte[] proneLabels, byte[] supineLabels, float[] proneImage, float[] supineImage,
                          double proneNoiseSigma, double supineNoiseSigma, float[][] displacement,
                          double[] lesionReference, double[] lesionProne, double[] lesionSupine,
                          double[] nippleReference, double[] nippleProne, double[] nippleSupine,
                          double[] landmarkReference, double[] landmarkProne, double[] landmarkSupine,
                          TruthMechanics truth, double seconds) {

    /** Truth conditions and solver diagnostics. */
    public TruthMechanics.Conditions conditions() {
        return truth.conditions();
    }
}
