package org.turnmark.app.cli;

import java.io.IOException;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.Supplier;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import org.turnmark.app.export.OutputFolder;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.ResearchUse;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.ChestWallBoundary;
import org.turnmark.mechanics.mesh.DenseDisplacement;
import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.mechanics.mesh.LabelMesh;
import org.turnmark.mechanics.mesh.SkinSmoother;
import org.turnmark.mechanics.mesh.VtkWriter;
import org.turnmark.mechanics.solve.NodeConstraints;
import org.turnmark.mechanics.solve.ReferenceStateResult;
import org.turnmark.mechanics.solve.SolveResult;
import org.turnmark.registration.nifti.NiftiDatatype;
import org.turnmark.registration.nifti.NiftiWriter;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/** Output files and the JSON summary of {@code turnmark simulate}. */
final class SimulateOutputs {

    /** Probe CSV header (after the caution comment line). */
    static final String PROBES_HEADER = "x_mm,y_mm,z_mm,ux_mm,uy_mm,uz_mm";

    private SimulateOutputs() {
    }

    /** Writes every output into the (temporary) output folder. */
    static void writeAll(OutputFolder folder, HexMesh mesh, SimulateRun run, double[][] cellFields,
                         DenseDisplacement field, boolean reload, double[] probes, double[] probeU,
                         boolean[] probeInside, Map<String, Object> summary) throws IOException {
        double[] u = difference(run.toXyz(), run.fromXyz());
        new VtkWriter(mesh).pointVectors("displacement_mm", u).cellScalars("det_F", cellFields[0])
                .cellScalars("von_mises_kPa", cellFields[1]).write(folder.resolve("mesh.vtk"), VtkWriter.Encoding.BINARY);
        if (reload) {
            HexMesh ref = run.stateMesh();
            new VtkWriter(ref).pointVectors("u_to_input_mm", difference(run.fromXyz(), ref.xyzMm()))
                    .pointVectors("u_to_output_mm", run.stateU())
                    .write(folder.resolve("reference_mesh.vtk"), VtkWriter.Encoding.BINARY);
        }
        Grid3 g = field.grid();
        NiftiWriter.writeDisplacementField(folder.resolve("displacement.nii.gz"),
                new VectorField(g, field.ux(), field.uy(), field.uz()), intentName(reload));
        float[] mask = new float[g.size()];
        for (int n = 0; n < mask.length; n++) {
            mask[n] = field.inside()[n];
        }
        NiftiWriter.writeVolume(folder.resolve("tissue_mask.nii.gz"), new Volume(g, mask), NiftiDatatype.UINT8);
        if (probes != null) {
            writeProbes(folder.resolve("probes.csv"), probes, probeU, probeInside);
        }
        byte[] json = new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT).writeValueAsBytes(summary);
        Files.write(folder.resolve("summary.json"), json);
    }

    static String intentName(boolean reload) {
        return reload ? "input->target" : "input->loaded";
    }

    private static void writeProbes(Path p, double[] probes, double[] u, boolean[] inside) throws IOException {
        try (Writer w = Files.newBufferedWriter(p, StandardCharsets.UTF_8)) {
            w.write("# " + ResearchUse.SHORT + "\n");
            w.write(PROBES_HEADER + "\n");
            for (int q = 0; q < inside.length; q++) {
                w.write(Double.toString(probes[3 * q]) + "," + probes[3 * q + 1] + "," + probes[3 * q + 2]);
                if (inside[q]) {
                    w.write(String.format(Locale.ROOT, ",%.4f,%.4f,%.4f", u[3 * q], u[3 * q + 1], u[3 * q + 2]));
                } else {
                    w.write(",,,");
                }
                w.write("\n");
            }
        }
    }

    /** The summary.json content. */
    static Map<String, Object> summary(Supplier<Map<String, Object>> inputs, boolean reload, String fromName,
                                       String toName, double[] gFrom, double[] gTo, boolean sliding, LabelMesh lm,
                                       HexMesh mesh, ChestWallBoundary.ChestWall wall, NodeConstraints bc,
                                       SkinSmoother.Result smoothing, MaterialTable mats, SimulateRun run,
                                       DenseDisplacement field, boolean[] probeInside, double[][] cellFields,
                                       List<String> warnings, double seconds) {
        Map<String, Object> s = new LinkedHashMap<>();
        s.put("caution", ResearchUse.FULL);
        s.put("mode", reload ? "reload: " + fromName + " image -> gravity-free reference -> " + toName
                : "forward: image geometry taken as unloaded, loaded once by gravity");
        s.put("inputs", inputs.get());
        Map<String, Object> units = new LinkedHashMap<>();
        units.put("length", "mm, world RAS+ (x right, y anterior, z superior)");
        units.put("gravity", "m/s^2, RAS");
        units.put("stress", "kPa (Cauchy)");
        units.put("density", "kg/m^3");
        units.put("energy", "mN*mm");
        units.put("time", "s unless the key says ms");
        s.put("units", units);
        Map<String, Object> load = new LinkedHashMap<>();
        load.put("gravity_input_m_s2", gFrom);
        load.put("gravity_output_m_s2", gTo);
        load.put("from", fromName);
        load.put("to", toName);
        s.put("loads", load);
        s.put("chest_wall", sliding ? "sliding (normal displacement zero; rim of the contact fixed)" : "fixed");
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("elements", mesh.elementCount());
        m.put("nodes", mesh.nodeCount());
        Map<String, Object> perLabel = new LinkedHashMap<>();
        for (int l = 1; l <= 5; l++) {
            if (lm.labelCounts()[l] > 0) {
                perLabel.put(l + " " + MaterialTable.name(l), lm.labelCounts()[l]);
            }
        }
        m.put("elements_per_label", perLabel);
        m.put("tissue_volume_mm3", lm.volumeMm3());
        m.put("tissue_pieces_found", lm.componentSizes());
        m.put("chest_wall_nodes", wall.size());
        m.put("fixed_nodes", bc.count(NodeConstraints.Kind.FIXED));
        m.put("sliding_nodes", bc.count(NodeConstraints.Kind.SLIDING));
        m.put("chest_wall_contact_mm", wall.contactMm());
        m.put("chest_wall_normal_sigma_mm", wall.sigmaMm());
        if (smoothing != null) {
            Map<String, Object> sm = new LinkedHashMap<>();
            sm.put("moved_nodes", smoothing.movedNodes());
            sm.put("backed_off_moves", smoothing.backedOff());
            sm.put("min_det_j_ratio", smoothing.minDetRatio());
            sm.put("max_move_mm", smoothing.maxMoveMm());
            m.put("skin_smoothing", sm);
        }
        s.put("mesh", m);
        Map<String, Object> mt = new LinkedHashMap<>();
        for (Map.Entry<Integer, NeoHookeanMaterial> e : mats.asMap().entrySet()) {
            Map<String, Object> x = new LinkedHashMap<>();
            x.put("name", MaterialTable.name(e.getKey()));
            x.put("mu_kpa", e.getValue().muKpa());
            x.put("nu", e.getValue().nu());
            x.put("kappa_kpa", e.getValue().kappaKpa());
            x.put("density_kg_m3", e.getValue().densityKgM3());
            mt.put(Integer.toString(e.getKey()), x);
        }
        s.put("materials", mt);
        s.put("energy", "psi = (mu/2)(J^(-2/3) I1 - 3) + (kappa/4)(J^2 - 1 - 2 ln J), mean-dilatation hexahedra");
        if (run.reference() != null) {
            ReferenceStateResult r = run.reference();
            Map<String, Object> rs = new LinkedHashMap<>();
            rs.put("method", r.method());
            rs.put("iterations", r.iterations());
            rs.put("max_mismatch_mm", r.maxMismatchMm());
            rs.put("held_nodes", r.heldNodes());
            rs.put("mismatch_history_mm", r.mismatchHistoryMm());
            rs.put("newton_iterations", r.newtonIterations());
            rs.put("linear_iterations", r.linearIterations());
            rs.put("time_ms", r.timeMs());
            s.put("reference_state", rs);
        }
        s.put("solve", solve(run.target()));
        Map<String, Object> res = new LinkedHashMap<>();
        res.put("max_displacement_mm", maxNorm(run.fromXyz(), run.toXyz()));
        res.put("element_det_f_min", min(cellFields[0]));
        res.put("element_det_f_max", max(cellFields[0]));
        res.put("element_von_mises_kpa_max", max(cellFields[1]));
        s.put("result", res);
        Map<String, Object> f = new LinkedHashMap<>();
        f.put("file", "displacement.nii.gz");
        f.put("intent_code", 1006);
        f.put("intent_name", intentName(reload));
        f.put("convention", "u is sampled on the label image grid; for an input-image point x (RAS+ mm) the same "
                + "tissue lies at x + u(x) in the " + (reload ? toName + " configuration" : "loaded configuration"));
        f.put("inside_voxels", field.insideCount());
        f.put("mask_file", "tissue_mask.nii.gz (1 inside the tissue mesh, 0 outside)");
        f.put("outside_policy", field.extrapolation().kind() == DenseDisplacement.Extrapolation.Kind.ZERO
                ? "zero" : "nearest tissue displacement times exp(-(d/L)^2), L = "
                + field.extrapolation().decayMm() + " mm");
        s.put("displacement_field", f);
        if (probeInside != null) {
            int in = 0;
            for (boolean b : probeInside) {
                in += b ? 1 : 0;
            }
            Map<String, Object> p = new LinkedHashMap<>();
            p.put("file", "probes.csv");
            p.put("probes", probeInside.length);
            p.put("inside", in);
            p.put("outside_blank", probeInside.length - in);
            s.put("probes", p);
        }
        s.put("warnings", warnings);
        s.put("seconds", seconds);
        return s;
    }

    private static Map<String, Object> solve(SolveResult r) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("converged", r.converged());
        m.put("load_steps", r.loadSteps());
        m.put("cut_steps", r.cutSteps());
        m.put("newton_iterations", r.newtonIterations());
        m.put("linear_iterations", r.linearIterations());
        m.put("residual_norm_mN", r.residualNormMn());
        m.put("relative_residual", r.relativeResidual());
        m.put("relative_energy_norm", r.relativeEnergyNorm());
        m.put("strain_energy_mN_mm", r.strainEnergyMnMm());
        m.put("min_det_f_gauss_points", r.minDetF());
        m.put("time_ms", r.timeMs());
        return m;
    }

    static double[] difference(double[] a, double[] b) {
        double[] d = new double[a.length];
        for (int i = 0; i < a.length; i++) {
            d[i] = a[i] - b[i];
        }
        return d;
    }

    static double maxNorm(double[] from, double[] to) {
        double m = 0;
        for (int i = 0; i < from.length; i += 3) {
            double dx = to[i] - from[i];
            double dy = to[i + 1] - from[i + 1];
            double dz = to[i + 2] - from[i + 2];
            m = Math.max(m, Math.sqrt(dx * dx + dy * dy + dz * dz));
        }
        return m;
    }

    static String vector(double[] v) {
        return String.format(Locale.ROOT, "(%.3g, %.3g, %.3g)", v[0], v[1], v[2]);
    }

    private static double min(double[] v) {
        double m = Double.POSITIVE_INFINITY;
        for (double x : v) {
            m = Math.min(m, x);
        }
        return m;
    }

    private static double max(double[] v) {
        double m = Double.NEGATIVE_INFINITY;
        for (double x : v) {
            m = Math.max(m, x);
        }
        return m;
    }
}
