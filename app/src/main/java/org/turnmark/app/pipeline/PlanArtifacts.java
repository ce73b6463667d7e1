package org.turnmark.app.pipeline;

import java.util.List;
import java.util.Map;

import org.turnmark.app.uncertainty.Ellipsoid;
import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.registration.volume.Volume;
import org.turnmark.registration.volume.VectorField;

/**
 * The large results of a plan, kept in memory for export: images, label images, displacement
 * fields with their stated direction, the mesh with nodal fields, and the ellipsoids per frame.
 *
 * @param prone          the prone image
 * @param supine         the supine image, or null
 * @param labels         the labels used (given or segmented), as a volume of whole numbers
 * @param segmented      true if the labels came from the automatic segmentation
 * @param fields         displacement fields by output name (e.g. "mechanics"), each with its direction
 * @param warped         the prone image warped to supine, by method
 * @param mesh           the mesh in the prone configuration
 * @param meshPointFields nodal vectors (3 per node, mm) by name for the VTK file
 * @param ellipsoids95   the 95 % ellipsoids by frame name ({@link PlanResult#FRAME_PRONE} or
 *                       {@link PlanResult#FRAME_SUPINE}), in lesion × method order
 */
public record PlanArtifacts(Volume prone, Volume supine, Volume labels, boolean segmented,
                            Map<String, Field> fields, Map<String, Volume> warped, HexMesh mesh,
                            Map<String, double[]> meshPointFields, Map<String, List<Ellipsoid>> ellipsoids95) {

    /**
     * A displacement field and what it means.
     *
     * @param field      RAS components (mm) on its grid
     * @param intentName ≤ 15 ASCII characters for the NIfTI intent_name, e.g. "supine->prone"
     * @param meaning    one sentence for the sidecar JSON: which point plus u is which
     */
    public record Field(VectorField field, String intentName, String meaning) {
    }
}
