package org.turnmark.app.cli;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.Callable;
import java.util.stream.Stream;

import org.turnmark.app.export.OutputFolder;
import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Parallel;
import org.turnmark.geom.Progress;
import org.turnmark.geom.ResearchUse;
import org.turnmark.mechanics.element.HexKernel;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.mechanics.mesh.ChestWallBoundary;
import org.turnmark.mechanics.mesh.FieldOfViewEdge;
import org.turnmark.mechanics.mesh.ConfigurationMap;
import org.turnmark.mechanics.mesh.DenseDisplacement;
import org.turnmark.mechanics.mesh.DisplacementFieldSampler;
import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.mechanics.mesh.LabelMesh;
import org.turnmark.mechanics.mesh.LabelMesher;
import org.turnmark.mechanics.mesh.MeshSurface;
import org.turnmark.mechanics.mesh.MesherConfig;
import org.turnmark.mechanics.mesh.PointMap;
import org.turnmark.mechanics.mesh.SkinSmoother;
import org.turnmark.mechanics.solve.ChestWallConstraints;
import org.turnmark.mechanics.solve.NodeConstraints;
import org.turnmark.mechanics.solve.SolverConfig;
import org.turnmark.mechanics.solve.SolverDivergedException;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code turnmark simulate}: a neo-Hookean finite-element gravity simulation from a label image.
 *
 * <p>Forward mode ({@code --gravity} or {@code --posture}): the image geometry is taken as unloaded
 * and loaded by gravity once. Reload mode ({@code --from P --to Q}): the image shows posture P; the
 * gravity-free reference state is estimated from it, then loaded by Q's gravity. Writes, atomically
 * into {@code --out}: {@code mesh.vtk}, {@code displacement.nii.gz} (on the label grid: x + u(x) is
 * where the tissue at input-image point x lies in the output configuration, RAS mm),
 * {@code tissue_mask.nii.gz}, {@code probes.csv} (with {@code --probes}) and {@code summary.json};
 * see docs/simulate.md.
 */
@Command(name = "simulate",
        header = "Solves the finite-element gravity model on a label image.",
        mixinStandardHelpOptions = true,
        description = {
            "Builds a hexahedral finite-element model of the breast from a label image (0 air, 1 fat,",
            "2 fibroglandular, 3 skin, 4 chest wall, 5 lesion) and solves for the neo-Hookean gravity",
            "deformation: one forward solve with the image taken as unloaded (--gravity or --posture), or",
            "the reference state from the imaged posture followed by a reload (--from prone --to supine).",
            "",
            Caution.SHORT})
final class SimulateCommand implements Callable<Integer> {

    /** Standard gravity used for postures, m/s² (common practice: 9.81). */
    static final double G_MS2 = 9.81;

    @CommandLine.Spec
    private CommandLine.Model.CommandSpec spec;

    @Option(names = "--labels", required = true, description = "Label image, NIfTI (0 air, 1 fat, 2 fibroglandular, 3 skin, 4 chest wall, 5 lesion).")
    private Path labelsPath;

    @Option(names = "--gravity", split = ",", description = "Forward mode: gravity vector X,Y,Z in m/s^2, RAS (e.g. 0,-9.81,0).")
    private double[] gravity;

    @Option(names = "--posture", description = "Forward mode: prone (gravity +y, anterior) or supine (gravity -y).")
    private String posture;

    @Option(names = "--tilt", defaultValue = "0", description = "Roll about the body (z) axis in degrees: applied to --posture, and to the supine side of --from/--to; positive turns supine gravity toward +x (patient right lower) (default ${DEFAULT-VALUE}).")
    private double tiltDeg;

    @Option(names = "--from", description = "Reload mode: posture of the image (prone or supine).")
    private String from;

    @Option(names = "--to", description = "Reload mode: posture to predict (prone or supine).")
    private String to;

    @Option(names = "--materials", description = "JSON file mapping labels to {\"mu_kpa\":..,\"nu\":..,\"density_kg_m3\":..}; absent labels keep defaults.")
    private Path materialsPath;

    @Option(names = "--chest-wall", defaultValue = "sliding", description = "Chest-wall boundary: fixed or sliding (default ${DEFAULT-VALUE}; the rim of the contact stays fixed).")
    private String chestWall;

    @Option(names = "--element-mm", defaultValue = "5", description = "Hexahedron edge length in mm, independent of the voxel size (default ${DEFAULT-VALUE}).")
    private double elementMm;

    @Option(names = "--smooth-skin", defaultValue = "0", description = "Taubin smoothing passes of the free surface, never inverting an element (default ${DEFAULT-VALUE}).")
    private int smoothSkin;

    @Option(names = "--outside-decay-mm", defaultValue = "0", description = "Displacement outside the tissue: 0 writes zero; L > 0 extends the nearest tissue displacement with weight exp(-(d/L)^2) (default ${DEFAULT-VALUE}).")
    private double outsideDecayMm;

    @Option(names = "--probes", description = "CSV with header x_mm,y_mm,z_mm (RAS, input image configuration).")
    private Path probesPath;

    @Option(names = "--out", required = true, description = "Output folder (written atomically).")
    private Path out;

    @Option(names = "--overwrite", description = "Replace an existing non-empty output folder.")
    private boolean overwrite;

    @Option(names = "--quiet", description = "No progress on stderr.")
    private boolean quiet;

    @Option(names = "--threads", description = "Worker threads (default: all cores).")
    private Integer threads;

    /** The loads of a run. */
    private record Plan(boolean reload, double[] gFrom, double[] gTo, String fromName, String toName) {
    }

    @Override
    public Integer call() throws IOException {
        Plan plan = plan();
        boolean sliding = parseChestWall();
        if (!(elementMm > 0) || !Double.isFinite(elementMm)) {
            throw new UserInputException("--element-mm must be a finite number > 0 mm, got " + elementMm);
        }
        if (smoothSkin < 0) {
            throw new UserInputException("--smooth-skin must be >= 0 passes, got " + smoothSkin);
        }
        if (!(outsideDecayMm >= 0) || !Double.isFinite(outsideDecayMm)) {
            throw new UserInputException("--outside-decay-mm must be a finite number >= 0 mm, got " + outsideDecayMm);
        }
        boolean replace = checkOut();
        long t0 = System.nanoTime();
        PrintWriter err = spec.commandLine().getErr();
        List<String> warnings = new ArrayList<>();

        SimulateInputs.Labels labels = SimulateInputs.readLabels(labelsPath);
        MaterialTable mats = materialsPath == null ? MaterialTable.DEFAULTS
                : SimulateInputs.readMaterials(materialsPath, MaterialTable.DEFAULTS);
        double[] probes = probesPath == null ? null : SimulateInputs.readProbes(probesPath);
        Progress progress = quiet ? Progress.NONE : new StderrProgress(err);

        progress.update("meshing", 0);
        LabelMesh lm = LabelMesher.mesh(labels.grid(), labels.labels(), MesherConfig.of(elementMm));
        warnings.addAll(lm.warnings());
        HexMesh mesh = lm.mesh();
        MeshSurface surface = MeshSurface.of(mesh);
        ChestWallBoundary.ChestWall wall = ChestWallBoundary.find(mesh, surface, labels.grid(), labels.labels(),
                elementMm);
        // tissue cut by the image's field of view is held as the body beyond it would hold it
        boolean[] cut = FieldOfViewEdge.cutNodes(mesh, labels.grid());
        SkinSmoother.Result smoothing = null;
        if (smoothSkin > 0) {
            boolean[] pinned = cut.clone();
            for (int n : wall.nodes()) {
                pinned[n] = true;
            }
            smoothing = SkinSmoother.smooth(mesh, surface, pinned, SkinSmoother.Config.defaults(smoothSkin));
            mesh = smoothing.mesh();
        }
        NodeConstraints bc = ChestWallConstraints.of(mesh, surface, wall, sliding);
        int nCut = FieldOfViewEdge.count(cut);
        for (int n = 0; n < cut.length; n++) {
            if (cut[n]) {
                bc.fix(n);
            }
        }
        if (nCut > 0) {
            warnings.add(nCut + " nodes where the image's field of view cuts the tissue are held in place "
                    + "(the body goes on beyond the image)");
        }
        progress.update("meshing", 1);

        SolverConfig cfg = SolverConfig.defaults();
        SimulateRun run;
        try {
            run = plan.reload()
                    ? SimulateRun.reload(mesh, mats, bc, plan.gFrom(), plan.gTo(), cfg, progress)
                    : SimulateRun.forward(mesh, mats, bc, plan.gTo(), cfg, progress);
        } catch (SolverDivergedException e) {
            throw new ProcessingException("the gravity simulation failed: " + e.getMessage()
                    + "; nothing written to " + out, e);
        }
        progress.update("displacement field", 0);
        PointMap map = new ConfigurationMap(mesh, run.fromXyz(), run.toXyz());
        DenseDisplacement.Extrapolation policy = outsideDecayMm > 0
                ? DenseDisplacement.Extrapolation.nearestDecay(outsideDecayMm)
                : DenseDisplacement.Extrapolation.zero();
        DenseDisplacement field = DisplacementFieldSampler.sample(map, labels.grid(), policy);
        progress.update("displacement field", 1);
        double[] probeU = null;
        boolean[] probeInside = null;
        if (probes != null) {
            int np = probes.length / 3;
            probeU = new double[probes.length];
            probeInside = new boolean[np];
            PointMap.Evaluator ev = map.evaluator();
            double[] y = new double[3];
            for (int q = 0; q < np; q++) {
                if (ev.map(probes[3 * q], probes[3 * q + 1], probes[3 * q + 2], y)) {
                    probeInside[q] = true;
                    for (int c = 0; c < 3; c++) {
                        probeU[3 * q + c] = y[c] - probes[3 * q + c];
                    }
                } else {
                    warnings.add(String.format(Locale.ROOT, "probe %d at (%.2f, %.2f, %.2f) mm lies outside the "
                                    + "tissue mesh; its displacement is left blank", q + 1, probes[3 * q],
                            probes[3 * q + 1], probes[3 * q + 2]));
                }
            }
        }
        double[][] cellFields = elementFields(run.stateMesh(), run.stateU(), mats);
        double seconds = (System.nanoTime() - t0) / 1e9;
        Map<String, Object> summary = SimulateOutputs.summary(this::describeInputs, plan.reload(), plan.fromName(),
                plan.toName(), plan.gFrom(), plan.gTo(), sliding, lm, mesh, wall, bc, smoothing, mats, run, field,
                probeInside, cellFields, warnings, seconds);
        try (OutputFolder folder = OutputFolder.create(out, replace)) {
            SimulateOutputs.writeAll(folder, mesh, run, cellFields, field, plan.reload(), probes, probeU, probeInside,
                    summary);
            folder.commit();
        }
        for (String w : warnings) {
            err.println("warning: " + w);
        }
        PrintWriter pw = spec.commandLine().getOut();
        pw.printf(Locale.ROOT, "simulated %s: %d elements, %d nodes (%d on the chest wall, %s); max displacement "
                        + "%.2f mm, min det F %.3f, %.1f s; written to %s%n", plan.reload()
                        ? plan.fromName() + " -> reference -> " + plan.toName() : "forward gravity "
                        + SimulateOutputs.vector(plan.gTo()) + " m/s2", mesh.elementCount(), mesh.nodeCount(),
                wall.size(), sliding ? "sliding" : "fixed", SimulateOutputs.maxNorm(run.fromXyz(), run.toXyz()),
                run.target().minDetF(), seconds, out.toAbsolutePath().normalize());
        pw.println(Caution.SHORT);
        pw.flush();
        err.flush();
        return 0;
    }

    private Map<String, Object> describeInputs() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("labels", labelsPath.toString());
        m.put("materials", materialsPath == null ? null : materialsPath.toString());
        m.put("probes", probesPath == null ? null : probesPath.toString());
        m.put("element_mm", elementMm);
        m.put("smooth_skin_passes", smoothSkin);
        m.put("outside_decay_mm", outsideDecayMm);
        m.put("tilt_deg", tiltDeg);
        m.put("threads", Parallel.threads());
        return m;
    }

    /** Resolves the loads from the options, rejecting incomplete or conflicting combinations. */
    private Plan plan() {
        int modes = (gravity != null ? 1 : 0) + (posture != null ? 1 : 0) + (from != null || to != null ? 1 : 0);
        if (modes != 1) {
            throw new UserInputException("give exactly one of --gravity X,Y,Z, --posture prone|supine, or "
                    + "--from POSTURE --to POSTURE");
        }
        if (!Double.isFinite(tiltDeg) || Math.abs(tiltDeg) > 90) {
            throw new UserInputException("--tilt must be a number of degrees in [-90, 90], got " + tiltDeg);
        }
        if (gravity != null) {
            if (gravity.length != 3) {
                throw new UserInputException("--gravity needs 3 comma-separated components X,Y,Z in m/s^2, got "
                        + gravity.length);
            }
            for (double g : gravity) {
                if (!Double.isFinite(g)) {
                    throw new UserInputException("--gravity components must be finite, got " + g);
                }
            }
            if (tiltDeg != 0) {
                throw new UserInputException("--tilt applies to postures; with --gravity give the tilted vector");
            }
            return new Plan(false, null, gravity.clone(), "input", "loaded");
        }
        if (posture != null) {
            return new Plan(false, null, postureGravity(posture, "--posture", true), "input", "loaded");
        }
        if (from == null || to == null) {
            throw new UserInputException("reload mode needs both --from and --to (e.g. --from prone --to supine)");
        }
        // In reload mode the tilt belongs to the supine side only.
        double[] gFrom = postureGravity(from, "--from", from.equalsIgnoreCase("supine"));
        double[] gTo = postureGravity(to, "--to", to.equalsIgnoreCase("supine"));
        String f = from.toLowerCase(Locale.ROOT);
        String t = to.toLowerCase(Locale.ROOT);
        if (f.equals(t)) {
            throw new UserInputException("--from and --to must differ, got " + f + " for both");
        }
        return new Plan(true, gFrom, gTo, f, t);
    }

    /** Gravity of a posture in RAS (prone +y, supine −y; REFERENCE §2), rolled by --tilt about z if asked. */
    private double[] postureGravity(String name, String option, boolean tilt) {
        double[] g;
        switch (name.toLowerCase(Locale.ROOT)) {
            case "prone" -> g = new double[] {0, G_MS2, 0};
            case "supine" -> g = new double[] {0, -G_MS2, 0};
            default -> throw new UserInputException(option + " must be prone or supine, got '" + name + "'");
        }
        if (tilt) {
            Affine3D.rotation(0, 0, 1, Math.toRadians(tiltDeg)).applyVector(g, g);
        }
        return g;
    }

    private boolean parseChestWall() {
        switch (chestWall.toLowerCase(Locale.ROOT)) {
            case "fixed":
                return false;
            case "sliding":
                return true;
            default:
                throw new UserInputException("--chest-wall must be fixed or sliding, got '" + chestWall + "'");
        }
    }

    /**
     * Whether the output folder may be replaced: an absent or empty folder always; a non-empty one only
     * with --overwrite (checked before any work, and again at commit).
     */
    private boolean checkOut() throws IOException {
        Path t = out.toAbsolutePath().normalize();
        if (!Files.exists(t)) {
            return false;
        }
        if (!Files.isDirectory(t)) {
            throw new UserInputException("--out " + t + " exists and is not a folder");
        }
        boolean empty;
        try (Stream<Path> s = Files.list(t)) {
            empty = s.findAny().isEmpty();
        }
        if (!empty && !overwrite) {
            throw new UserInputException("output folder " + t + " exists and is not empty; choose another --out "
                    + "or pass --overwrite");
        }
        return true;
    }

    /**
     * Per element at its centre: det F and the von Mises equivalent of the Cauchy stress (kPa),
     * σ_vm = √(3/2 s:s), s = σ − tr(σ)/3 I, for the state {@code u} of {@code reference}.
     *
     * @return {detF, vonMisesKpa}
     */
    static double[][] elementFields(HexMesh reference, double[] u, MaterialTable mats) {
        int ne = reference.elementCount();
        double[] det = new double[ne];
        double[] vm = new double[ne];
        double[] xe = new double[24];
        double[] ue = new double[24];
        double[] f = new double[9];
        double[] s = new double[9];
        int[] hex = reference.hex();
        double[] x = reference.xyzMm();
        double[] j0 = new double[9];
        double[] jx = new double[9];
        double[] inv = new double[9];
        for (int e = 0; e < ne; e++) {
            for (int a = 0; a < 8; a++) {
                int p = 3 * hex[8 * e + a];
                for (int c = 0; c < 3; c++) {
                    xe[3 * a + c] = x[p + c];
                    ue[3 * a + c] = u[p + c];
                }
            }
            det[e] = HexKernel.centreDeformationGradient(xe, ue, f, j0, jx, inv);
            NeoHookeanMaterial m = mats.get(reference.label()[e]);
            m.cauchyStress(f, s);
            double tr = (s[0] + s[4] + s[8]) / 3;
            double d0 = s[0] - tr;
            double d1 = s[4] - tr;
            double d2 = s[8] - tr;
            double ss = d0 * d0 + d1 * d1 + d2 * d2 + 2 * (s[1] * s[1] + s[2] * s[2] + s[5] * s[5]);
            vm[e] = Math.sqrt(1.5 * ss);
        }
        return new double[][] {det, vm};
    }

    /** Line-based progress on stderr: one line per stage change or 10 % step. Thread safe. */
    private static final class StderrProgress implements Progress {
        private final PrintWriter err;
        private String lastStage = "";
        private int lastDecile = -1;

        StderrProgress(PrintWriter err) {
            this.err = err;
        }

        @Override
        public synchronized void update(String stage, double fraction) {
            int decile = (int) Math.floor(Math.max(0, Math.min(1, fraction)) * 10);
            if (!stage.equals(lastStage) || decile != lastDecile) {
                err.printf(Locale.ROOT, "simulate: %s %d %%%n", stage, decile * 10);
                err.flush();
                lastStage = stage;
                lastDecile = decile;
            }
        }
    }

    /** The research-use caution, for the summary. */
    static String caution() {
        return ResearchUse.FULL;
    }
}
