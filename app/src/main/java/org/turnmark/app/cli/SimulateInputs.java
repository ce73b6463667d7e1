package org.turnmark.app.cli;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Iterator;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;

import com.fasterxml.jackson.core.JsonParseException;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import org.turnmark.geom.Grid3;
import org.turnmark.mechanics.material.MaterialTable;
import org.turnmark.mechanics.material.NeoHookeanMaterial;
import org.turnmark.registration.nifti.NiftiReader;
import org.turnmark.registration.volume.Volume;

/**
 * Input files of {@code turnmark simulate}: the label image, the materials file and the probe file.
 * Every error names the file, the field or line, what was expected and what was found.
 */
final class SimulateInputs {

    /** Keys allowed inside a label's entry of the materials file. */
    static final Set<String> MATERIAL_KEYS = Set.of("mu_kpa", "nu", "density_kg_m3");

    private SimulateInputs() {
    }

    /** A label image: its grid and one label 0..5 per voxel. */
    record Labels(Grid3 grid, byte[] labels) {
    }

    /**
     * Reads a label image (NIfTI, any integer-valued datatype): every voxel must hold a whole number
     * 0..5 after scaling.
     */
    static Labels readLabels(Path path) throws IOException {
        Volume v = new NiftiReader().readVolume(path).volume();
        float[] d = v.data();
        Grid3 g = v.grid();
        byte[] out = new byte[d.length];
        for (int n = 0; n < d.length; n++) {
            float x = d[n];
            if (!(x >= 0 && x <= 5 && x == Math.rint(x))) {
                int i = n % g.nx();
                int j = (n / g.nx()) % g.ny();
                int k = n / (g.nx() * g.ny());
                throw new UserInputException(String.format(Locale.ROOT,
                        "unknown label %s at voxel (%d, %d, %d) in %s; labels must be 0 air, 1 fat, 2 fibroglandular, "
                                + "3 skin, 4 chest wall, 5 lesion", Float.toString(x), i, j, k, path));
            }
            out[n] = (byte) x;
        }
        return new Labels(g, out);
    }

    /**
     * Reads a materials file: a JSON object whose keys are tissue labels ("1", "2", "3", "5") and whose
     * values are objects with any of {@code mu_kpa}, {@code nu}, {@code density_kg_m3}. Labels and
     * parameters not given keep their defaults ({@code base}).
     */
    static MaterialTable readMaterials(Path path, MaterialTable base) throws IOException {
        JsonNode root;
        try {
            root = new ObjectMapper().readTree(Files.readAllBytes(path));
        } catch (JsonParseException e) {
            throw new UserInputException("materials file " + path + " is not valid JSON: "
                    + e.getOriginalMessage() + " (line " + e.getLocation().getLineNr() + ")");
        }
        if (root == null || !root.isObject()) {
            throw new UserInputException("materials file " + path + " must hold a JSON object mapping labels to "
                    + "{\"mu_kpa\": ..., \"nu\": ..., \"density_kg_m3\": ...}, got "
                    + (root == null ? "nothing" : root.getNodeType().toString().toLowerCase(Locale.ROOT)));
        }
        MaterialTable table = base;
        Iterator<Map.Entry<String, JsonNode>> it = root.fields();
        while (it.hasNext()) {
            Map.Entry<String, JsonNode> e = it.next();
            int label = parseLabel(path, e.getKey());
            if (!(e.getValue() instanceof ObjectNode entry)) {
                throw new UserInputException("materials file " + path + ": label " + label
                        + " must map to an object with mu_kpa, nu, density_kg_m3, got " + e.getValue());
            }
            NeoHookeanMaterial d = base.get(label);
            double mu = d.muKpa();
            double nu = d.nu();
            double rho = d.densityKgM3();
            Iterator<Map.Entry<String, JsonNode>> f = entry.fields();
            while (f.hasNext()) {
                Map.Entry<String, JsonNode> p = f.next();
                if (!MATERIAL_KEYS.contains(p.getKey())) {
                    throw new UserInputException("materials file " + path + ": unknown key \"" + p.getKey()
                            + "\" for label " + label + "; allowed keys are mu_kpa, nu, density_kg_m3");
                }
                if (!p.getValue().isNumber()) {
                    throw new UserInputException("materials file " + path + ": label " + label + " " + p.getKey()
                            + " must be a number, got " + p.getValue());
                }
                double v = p.getValue().doubleValue();
                switch (p.getKey()) {
                    case "mu_kpa" -> mu = v;
                    case "nu" -> nu = v;
                    default -> rho = v;
                }
            }
            try {
                table = table.with(label, mu, nu, rho);
            } catch (IllegalArgumentException ex) {
                throw new UserInputException("materials file " + path + ": " + ex.getMessage(), ex);
            }
        }
        return table;
    }

    private static int parseLabel(Path path, String key) {
        int label;
        try {
            label = Integer.parseInt(key.trim());
        } catch (NumberFormatException e) {
            throw new UserInputException("materials file " + path + ": key \"" + key
                    + "\" is not a label number; use 1 fat, 2 fibroglandular, 3 skin, 5 lesion");
        }
        if (label == MaterialTable.CHEST_WALL) {
            throw new UserInputException("materials file " + path + ": label 4 (chest wall) is rigid and not "
                    + "meshed, so it takes no material; use 1 fat, 2 fibroglandular, 3 skin, 5 lesion");
        }
        if (label != MaterialTable.FAT && label != MaterialTable.FIBROGLANDULAR && label != MaterialTable.SKIN
                && label != MaterialTable.LESION) {
            throw new UserInputException("materials file " + path + ": unknown label " + key
                    + "; use 1 fat, 2 fibroglandular, 3 skin, 5 lesion");
        }
        return label;
    }

    /**
     * Reads probe points: CSV with header {@code x_mm,y_mm,z_mm} (RAS, input configuration); blank
     * lines and lines starting with {@code #} are skipped.
     *
     * @return coordinates, 3 per probe (mm)
     */
    static double[] readProbes(Path path) throws IOException {
        List<String> lines = Files.readAllLines(path, StandardCharsets.UTF_8);
        double[] xyz = new double[0];
        int count = 0;
        boolean header = false;
        for (int ln = 0; ln < lines.size(); ln++) {
            String l = lines.get(ln).strip();
            if (ln == 0 && l.startsWith("\uFEFF")) {
                l = l.substring(1);
            }
            if (l.isEmpty() || l.startsWith("#")) {
                continue;
            }
            String[] t = l.split(",", -1);
            if (!header) {
                if (t.length != 3 || !t[0].strip().equals("x_mm") || !t[1].strip().equals("y_mm")
                        || !t[2].strip().equals("z_mm")) {
                    throw new UserInputException("probe file " + path + " line " + (ln + 1)
                            + ": expected the header x_mm,y_mm,z_mm, got \"" + l + "\"");
                }
                header = true;
                continue;
            }
            if (t.length != 3) {
                throw new UserInputException("probe file " + path + " line " + (ln + 1) + ": expected 3 values "
                        + "x_mm,y_mm,z_mm, got " + t.length + " in \"" + l + "\"");
            }
            if (count == xyz.length / 3) {
                xyz = java.util.Arrays.copyOf(xyz, Math.max(24, 2 * xyz.length));
            }
            for (int c = 0; c < 3; c++) {
                double v;
                try {
                    v = Double.parseDouble(t[c].strip());
                } catch (NumberFormatException e) {
                    throw new UserInputException("probe file " + path + " line " + (ln + 1) + ": "
                            + "xyz".charAt(c) + "_mm must be a number, got \"" + t[c].strip() + "\"");
                }
                if (!Double.isFinite(v)) {
                    throw new UserInputException("probe file " + path + " line " + (ln + 1) + ": "
                            + "xyz".charAt(c) + "_mm must be finite, got " + t[c].strip());
                }
                xyz[3 * count + c] = v;
            }
            count++;
        }
        if (!header) {
            throw new UserInputException("probe file " + path + " is empty; expected the header x_mm,y_mm,z_mm");
        }
        return java.util.Arrays.copyOf(xyz, 3 * count);
    }
}
