package org.turnmark.app.phantom;

import java.util.SplittableRandom;

import org.turnmark.geom.Grid3;
import org.turnmark.geom.Parallel;
import org.turnmark.geom.Progress;

/**
 * The gravity-free reference anatomy of a synthetic case, defined analytically in RAS mm so that it
 * can be sampled at any point (the posture images map every voxel back here).
 *
 * <p>Torso: an elliptic cylinder along z, {@code (x/A_x)² + ((y − c_y)/A_y)² < 1} with
 * {@link #TORSO_AX_MM}, {@link #TORSO_AY_MM}, {@link #TORSO_CY_MM} (its anterior surface crosses
 * y = 0 at the midline). Depth under the torso surface is {@code t = (1 − r)/|∇r|}. Points deeper than
 * {@link #SUBCUTANEOUS_FAT_MM} are chest wall (label 4): first a pectoral muscle layer of
 * {@link #MUSCLE_MM}, then the rib cage (rendered darker, same label). Breasts ({@link BreastMound})
 * are joined to the torso by a smooth union {@code smax_k(a, b) = max(a, b) + max(k − |a − b|, 0)²/(4k)}
 * of the approximate signed distances (k = 10 mm torso–mound, 2 mm mound–nipple), which forms an
 * inframammary fold. Inside the body: skin (label 3) in the outer {@link #SKIN_MM} (or one voxel,
 * whichever is thicker, when rasterised), lesions (5), fibroglandular tissue (2) where the gland
 * density ≥ {@link #GLAND_THRESHOLD}, fat (1) elsewhere.
 *
 * <p>Gland density: a sum of Gaussian tubes around the duct segments of each breast's
 * {@link DuctalTree} (σ = radius + 0.8 mm, amplitude 1.2) and Gaussian lobules at its terminal
 * ducts, times a smooth envelope that keeps it ≥ 4–9 mm under the skin and 3–7 mm in front of the
 * chest wall; it is tabulated on a fine grid (half the image spacing) and read trilinearly.
 * Deterministic for a seed; immutable after {@link #build}, so safe to sample from many threads.
 */
public final class PhantomAnatomy {

    /** Torso half-width A_x (mm). */
    public static final double TORSO_AX_MM = 165;
    /** Torso half-depth A_y (mm). */
    public static final double TORSO_AY_MM = 115;
    /** Torso centre c_y (mm); the anterior torso surface crosses y = 0 at x = 0. */
    public static final double TORSO_CY_MM = -115;
    /** Subcutaneous fat between the torso skin and the pectoral muscle (mm). */
    public static final double SUBCUTANEOUS_FAT_MM = 10;
    /** Pectoral muscle thickness (mm); deeper chest wall is rib cage. */
    public static final double MUSCLE_MM = 14;
    /** Skin thickness (mm), within the 1.5–2 mm of the specification. */
    public static final double SKIN_MM = 1.8;
    /** Gland density at and above which tissue is fibroglandular. */
    public static final double GLAND_THRESHOLD = 0.5;

    /** Tissue classes of {@link #tissueClass}; labels follow the mechanics conventions. */
    public static final int AIR = 0;
    public static final int FAT = 1;
    public static final int GLAND = 2;
    public static final int SKIN = 3;
    public static final int MUSCLE = 4;
    public static final int LESION = 5;
    /** Rib cage behind the muscle: label 4 like the muscle, darker in the images. */
    public static final int RIB_CAGE = 6;
    /** Ribs and sternum (chest field of view only): label 4, marrow-bright in T1. */
    public static final int BONE = 7;
    /** Lung behind the rib layer (chest field of view only): label 4, nearly black. */
    public static final int LUNG = 8;

    /** Depth under the torso skin where the rib layer starts (mm): under the fat and the muscle. */
    public static final double RIB_LAYER_MM = SUBCUTANEOUS_FAT_MM + MUSCLE_MM;
    /** Thickness of the rib layer (ribs, sternum and the muscle between ribs), mm. */
    public static final double RIB_THICKNESS_MM = 10;
    /** Half-height of a rib in z (mm): 12 mm ribs. */
    public static final double RIB_HALF_HEIGHT_MM = 6;
    /** Rise of a rib's centre line per mm away from the midline (the ribs climb laterally). */
    public static final double RIB_RISE = 0.15;
    /** Pitch of successive ribs along z at the midline: uniform in this range per rib (mm), so no two
     *  intercostal spaces need be alike and the pattern has no period. */
    public static final double RIB_PITCH_MIN_MM = 20;
    public static final double RIB_PITCH_MAX_MM = 32;
    /** Heart (chest field of view only): label 4, an ellipsoid behind the sternum, left of the midline. */
    public static final int HEART = 9;
    /** Heart centre in x and y (mm) and its semi-axes (mm); its z centre is 10 mm below the image's middle. */
    public static final double[] HEART_CENTRE_XY_MM = {-30, -80};
    public static final double[] HEART_SEMI_AXES_MM = {55, 38, 55};
    /** Half-width of the sternum (mm). */
    public static final double STERNUM_HALF_WIDTH_MM = 15;

    private static final double MOUND_BLEND_MM = 10;
    private static final double NIPPLE_BLEND_MM = 2;
    private static final double TUBE_AMPLITUDE = 1.2;
    private static final double TUBE_EXTRA_SIGMA_MM = 0.8;
    private static final double SPLAT_SIGMAS = 3.5;

    private final PhantomOptions options;
    private final BreastMound[] mounds;
    private final DuctalTree[] trees;
    /** Per lesion 15 values: centre (3), unit axes u1, u2, u3 (9), semi-axes (3). */
    private final double[] lesions;
    private final double[] nipples;
    private final Grid3 grid;
    private final Grid3 fineGrid;
    private final float[] gland;
    private final double fineOx;
    private final double fineOy;
    private final double fineOz;
    private final double fineSpacing;
    /** Rib centre lines at the midline (z, mm, ascending); empty with the breast field of view. */
    private final double[] ribZ;
    /** Heart centre z (mm); NaN with the breast field of view. */
    private final double heartZ;

    private PhantomAnatomy(PhantomOptions options, BreastMound[] mounds, DuctalTree[] trees, double[] lesions,
                           double[] nipples, Grid3 grid, Grid3 fineGrid, float[] gland) {
        this.options = options;
        this.mounds = mounds;
        this.trees = trees;
        this.lesions = lesions;
        this.nipples = nipples;
        this.grid = grid;
        this.fineGrid = fineGrid;
        this.gland = gland;
        double[] o = fineGrid.worldOf(0, 0, 0);
        this.fineOx = o[0];
        this.fineOy = o[1];
        this.fineOz = o[2];
        this.fineSpacing = fineGrid.spacingMm(0);
        boolean chest = options.fieldOfView() == PhantomOptions.FieldOfView.CHEST;
        this.ribZ = chest ? ribs(options.seed(), grid) : new double[0];
        this.heartZ = chest ? 0.5 * (grid.worldOf(0, 0, 0)[2] + grid.worldOf(0, 0, grid.nz() - 1)[2]) - 10 : Double.NaN;
    }

    /**
     * Rib centre lines at the midline for the chest field of view: from 80 mm below the image to 80 mm
     * above it (room for the supine placement), at a pitch drawn per rib. A stream of its own, so the
     * breasts, ducts and lesions are those of the same seed with the breast field of view.
     */
    private static double[] ribs(long seed, Grid3 grid) {
        SplittableRandom r = new SplittableRandom(seed ^ 0x52494253L);
        double lo = grid.worldOf(0, 0, 0)[2] - 80;
        double hi = grid.worldOf(0, 0, grid.nz() - 1)[2] + 80;
        java.util.List<Double> z = new java.util.ArrayList<>();
        for (double at = lo + r.nextDouble(0, RIB_PITCH_MAX_MM); at < hi;
                at += r.nextDouble(RIB_PITCH_MIN_MM, RIB_PITCH_MAX_MM)) {
            z.add(at);
        }
        return z.stream().mapToDouble(Double::doubleValue).toArray();
    }

    /** Rib centre lines at the midline (z, mm, ascending, new array); empty with the breast field of view. */
    public double[] ribCentresMm() {
        return ribZ.clone();
    }

    /**
     * Builds the anatomy of a case.
     *
     * @param o        validated options
     * @param progress progress sink ("anatomy")
     * @throws IllegalArgumentException if the lesions cannot be placed inside the gland envelope
     */
    public static PhantomAnatomy build(PhantomOptions o, Progress progress) {
        SplittableRandom rng = new SplittableRandom(o.seed());
        int nb = o.breasts();
        BreastMound[] mounds = new BreastMound[nb];
        for (int b = 0; b < nb; b++) {
            double side = nb == 2 ? (b == 0 ? 1 : -1) : ("right".equals(o.side()) ? 1 : -1);
            mounds[b] = makeMound(o, side, rng);
        }
        // Provisional anatomy (no gland yet) to answer envelope queries while growing the trees.
        Grid3 grid = imageGrid(mounds, o.spacingMm(), o.fieldOfView());
        double fs = o.spacingMm() / 2;
        Grid3 fine = fineGrid(grid, fs);
        PhantomAnatomy shape = new PhantomAnatomy(o, mounds, new DuctalTree[0], new double[0], new double[0],
                grid, fine, new float[1]);
        DuctalTree.Envelope env = new DuctalTree.Envelope() {
            @Override
            public double skinDepth(double x, double y, double z) {
                return shape.bodyDepth(x, y, z);
            }

            @Override
            public double chestWallDistance(double x, double y, double z) {
                return SUBCUTANEOUS_FAT_MM - shape.torsoDepth(x, y);
            }
        };
        DuctalTree[] trees = new DuctalTree[nb];
        for (int b = 0; b < nb; b++) {
            int generations = 3;
            DuctalTree t;
            SplittableRandom treeRng = rng.split();
            do {
                t = DuctalTree.grow(mounds[b], treeRng.split(), env, generations);
                generations++;
            } while (t.branchCount < 24 && generations <= 6);
            if (t.branchCount < 20) {
                throw new IllegalArgumentException("breast too small for 20 duct branch points (got "
                        + t.branchCount + "); increase breast_volume_ml (" + o.breastVolumeMl() + ")");
            }
            trees[b] = t;
        }
        progress.update("anatomy", 0.2);
        double[] nipples = new double[3 * nb];
        for (int b = 0; b < nb; b++) {
            double[] tip = shape.nippleTip(mounds[b]);
            System.arraycopy(tip, 0, nipples, 3 * b, 3);
        }
        double[] lesions = placeLesions(o, mounds, trees, shape, rng.split());
        float[] gland = new float[fine.size()];
        PhantomAnatomy withTrees = new PhantomAnatomy(o, mounds, trees, lesions, nipples, grid, fine, gland);
        withTrees.splatGland(progress.sub("anatomy", 0.2, 1.0));
        return withTrees;
    }

    private static BreastMound makeMound(PhantomOptions o, double side, SplittableRandom rng) {
        double vz = 0.9 + 0.1 * rng.nextDouble();
        double vol = o.breastVolumeMl() * 1000; // mm³
        // Hemi-ellipsoid anterior of the chest wall: V = (2/3) π a_l a_n a_z.
        double al = Math.cbrt(3 * vol / (2 * Math.PI * vz * o.projection()));
        double an = o.projection() * al;
        double az = vz * al;
        double xb = side * (72 + 6 * rng.nextDouble());
        double ax2 = TORSO_AX_MM * TORSO_AX_MM;
        double ay2 = TORSO_AY_MM * TORSO_AY_MM;
        double yb = TORSO_CY_MM + TORSO_AY_MM * Math.sqrt(1 - xb * xb / ax2);
        double nx = xb / ax2;
        double ny = (yb - TORSO_CY_MM) / ay2;
        double nn = Math.hypot(nx, ny);
        double[] en = {nx / nn, ny / nn, 0};
        double zb = -5 + 10 * rng.nextDouble();
        double[] c = {xb - SUBCUTANEOUS_FAT_MM * en[0], yb - SUBCUTANEOUS_FAT_MM * en[1], zb};
        return new BreastMound(side, c, en, al, an + SUBCUTANEOUS_FAT_MM, az, o.ptosis());
    }

    /** Image grid: the mounds' bounding box plus margins for the posture changes, on the spacing lattice. */
    private static Grid3 imageGrid(BreastMound[] mounds, double s, PhantomOptions.FieldOfView fov) {
        double[] lo = {Double.MAX_VALUE, Double.MAX_VALUE, Double.MAX_VALUE};
        double[] hi = {-Double.MAX_VALUE, -Double.MAX_VALUE, -Double.MAX_VALUE};
        double lateralLo = 0;
        double lateralHi = 0;
        for (BreastMound m : mounds) {
            for (int a = 0; a < 64; a++) {
                for (int b = 0; b <= 32; b++) {
                    double th = Math.PI * b / 32;
                    double ph = 2 * Math.PI * a / 64;
                    double n = m.an * Math.sin(th) * Math.abs(Math.sin(ph));
                    double l = m.al * Math.cos(th);
                    double z = m.az * Math.sin(th) * Math.cos(ph) - m.kappa * n * n;
                    double[] p = m.local(l, n, z);
                    for (int d = 0; d < 3; d++) {
                        lo[d] = Math.min(lo[d], p[d]);
                        hi[d] = Math.max(hi[d], p[d]);
                    }
                }
            }
            lo[1] = Math.min(lo[1], m.c[1] - 26);
            if (m.side > 0) {
                lateralHi = 1;
            } else {
                lateralLo = 1;
            }
        }
        // Margins (mm): the prone breast hangs anteriorly, the supine one spreads laterally.
        lo[0] -= lateralLo > 0 ? 30 : 15;
        hi[0] += lateralHi > 0 ? 30 : 15;
        hi[1] += 40;
        // The lateral body wall sinks posteriorly when supine.
        lo[1] -= 16;
        lo[2] -= 25;
        hi[2] += 20;
        if (fov == PhantomOptions.FieldOfView.CHEST) {
            // both sides of the chest past the torso's flanks, and back to its centre line
            lo[0] = Math.min(lo[0], -TORSO_AX_MM - 20);
            hi[0] = Math.max(hi[0], TORSO_AX_MM + 20);
            lo[1] = Math.min(lo[1], TORSO_CY_MM - 5);
        }
        int[] n = new int[3];
        double[] origin = new double[3];
        for (int d = 0; d < 3; d++) {
            origin[d] = Math.floor(lo[d] / s) * s;
            n[d] = (int) Math.ceil((hi[d] - origin[d]) / s) + 1;
        }
        return Grid3.axisAligned(n[0], n[1], n[2], s, s, s, origin[0], origin[1], origin[2]);
    }

    private static Grid3 fineGrid(Grid3 grid, double fs) {
        double s = grid.spacingMm(0);
        double[] o = grid.worldOf(-0.5, -0.5, -0.5);
        int nx = (int) Math.ceil(grid.nx() * s / fs) + 1;
        int ny = (int) Math.ceil(grid.ny() * s / fs) + 1;
        int nz = (int) Math.ceil(grid.nz() * s / fs) + 1;
        return Grid3.axisAligned(nx, ny, nz, fs, fs, fs, o[0], o[1], o[2]);
    }

    private double[] nippleTip(BreastMound m) {
        double[] c = m.nippleCentre;
        double lo = 0;
        double hi = BreastMound.NIPPLE_RADIUS_MM + 6;
        for (int it = 0; it < 60; it++) {
            double t = 0.5 * (lo + hi);
            if (bodyDepth(c[0] + t * m.en[0], c[1] + t * m.en[1], c[2] + t * m.en[2]) > 0) {
                lo = t;
            } else {
                hi = t;
            }
        }
        double t = 0.5 * (lo + hi);
        return new double[] {c[0] + t * m.en[0], c[1] + t * m.en[1], c[2] + t * m.en[2]};
    }

    private static double[] placeLesions(PhantomOptions o, BreastMound[] mounds, DuctalTree[] trees,
                                         PhantomAnatomy shape, SplittableRandom rng) {
        int n = o.lesionCount();
        double r = o.lesionDiameterMm() / 2;
        double[] out = new double[15 * n];
        for (int i = 0; i < n; i++) {
            int b = i % mounds.length;
            DuctalTree t = trees[b];
            double[] centre = null;
            // Lesions arise in the terminal duct lobular units: try lobule centres first, then the mound.
            for (int attempt = 0; attempt < 400 && centre == null; attempt++) {
                double[] p;
                if (attempt < 200) {
                    int k = rng.nextInt(t.blobCount);
                    p = new double[] {t.blobs[5 * k], t.blobs[5 * k + 1], t.blobs[5 * k + 2]};
                } else {
                    BreastMound m = mounds[b];
                    double nn = m.an * (0.3 + 0.3 * rng.nextDouble());
                    p = m.local(m.al * 0.5 * (2 * rng.nextDouble() - 1), nn,
                            m.az * 0.5 * (2 * rng.nextDouble() - 1) - m.kappa * nn * nn);
                }
                if (shape.bodyDepth(p[0], p[1], p[2]) < r + 6
                        || SUBCUTANEOUS_FAT_MM - shape.torsoDepth(p[0], p[1]) < r + 6) {
                    continue;
                }
                boolean clear = true;
                for (int j = 0; j < i; j++) {
                    double dx = p[0] - out[15 * j];
                    double dy = p[1] - out[15 * j + 1];
                    double dz = p[2] - out[15 * j + 2];
                    if (Math.sqrt(dx * dx + dy * dy + dz * dz) < 2 * r + 5) {
                        clear = false;
                    }
                }
                if (clear) {
                    centre = p;
                }
            }
            if (centre == null) {
                throw new IllegalArgumentException("cannot place " + n + " lesion(s) of " + o.lesionDiameterMm()
                        + " mm inside a " + o.breastVolumeMl() + " ml breast; use a smaller lesion_mm or larger breast");
            }
            double[] u1 = unit(rng);
            double[] v = unit(rng);
            double dot = v[0] * u1[0] + v[1] * u1[1] + v[2] * u1[2];
            double[] u2 = {v[0] - dot * u1[0], v[1] - dot * u1[1], v[2] - dot * u1[2]};
            double nu2 = Math.sqrt(u2[0] * u2[0] + u2[1] * u2[1] + u2[2] * u2[2]);
            for (int d = 0; d < 3; d++) {
                u2[d] /= nu2;
            }
            double[] u3 = {u1[1] * u2[2] - u1[2] * u2[1], u1[2] * u2[0] - u1[0] * u2[2], u1[0] * u2[1] - u1[1] * u2[0]};
            // Mildly ellipsoidal, with the volume of a sphere of the requested diameter.
            double f = Math.cbrt(1.12 * 1.0 * 0.89);
            int oo = 15 * i;
            System.arraycopy(centre, 0, out, oo, 3);
            System.arraycopy(u1, 0, out, oo + 3, 3);
            System.arraycopy(u2, 0, out, oo + 6, 3);
            System.arraycopy(u3, 0, out, oo + 9, 3);
            out[oo + 12] = r * 1.12 / f;
            out[oo + 13] = r * 1.0 / f;
            out[oo + 14] = r * 0.89 / f;
        }
        return out;
    }

    private static double[] unit(SplittableRandom rng) {
        double z = 2 * rng.nextDouble() - 1;
        double a = 2 * Math.PI * rng.nextDouble();
        double s = Math.sqrt(1 - z * z);
        return new double[] {s * StrictMath.cos(a), s * StrictMath.sin(a), z};
    }

    /** Tabulates the enveloped gland density on the fine grid, in parallel z-slabs (deterministic). */
    private void splatGland(Progress progress) {
        final int nx = fineGrid.nx();
        final int ny = fineGrid.ny();
        final int nz = fineGrid.nz();
        final int slab = 4;
        int nBlocks = Parallel.blockCount(nz, slab);
        java.util.concurrent.atomic.AtomicInteger done = new java.util.concurrent.atomic.AtomicInteger();
        Parallel.forEachBlock(nBlocks, (long) nx * ny * nz * 4, b -> {
            int k0 = b * slab;
            int k1 = Math.min(nz, k0 + slab);
            for (DuctalTree t : trees) {
                for (int s = 0; s < t.segmentCount; s++) {
                    splatSegment(t.segments, 7 * s, k0, k1);
                }
                for (int s = 0; s < t.blobCount; s++) {
                    splatBlob(t.blobs, 5 * s, k0, k1);
                }
            }
            // Envelope: keep gland off the skin and the chest wall.
            for (int k = k0; k < k1; k++) {
                double z = fineOz + k * fineSpacing;
                for (int j = 0; j < ny; j++) {
                    double y = fineOy + j * fineSpacing;
                    int row = nx * (j + ny * k);
                    for (int i = 0; i < nx; i++) {
                        float g = gland[row + i];
                        if (g > 1e-3f) {
                            double x = fineOx + i * fineSpacing;
                            double dT = torsoDepth(x, y);
                            double w = smoothstep(4, 9, bodyDepth(x, y, z))
                                    * smoothstep(3, 7, SUBCUTANEOUS_FAT_MM - dT);
                            gland[row + i] = (float) (g * w);
                        }
                    }
                }
            }
            progress.update("anatomy", done.incrementAndGet() / (double) nBlocks);
        });
    }

    private void splatSegment(double[] s, int o, int k0, int k1) {
        double sigma = s[o + 6] + TUBE_EXTRA_SIGMA_MM;
        double reach = SPLAT_SIGMAS * sigma;
        double ax = s[o];
        double ay = s[o + 1];
        double az = s[o + 2];
        double dx = s[o + 3] - ax;
        double dy = s[o + 4] - ay;
        double dz = s[o + 5] - az;
        double len2 = dx * dx + dy * dy + dz * dz;
        int[] box = box(Math.min(ax, ax + dx) - reach, Math.max(ax, ax + dx) + reach,
                Math.min(ay, ay + dy) - reach, Math.max(ay, ay + dy) + reach,
                Math.min(az, az + dz) - reach, Math.max(az, az + dz) + reach, k0, k1);
        if (box == null) {
            return;
        }
        double inv2s2 = 1 / (2 * sigma * sigma);
        int nx = fineGrid.nx();
        int ny = fineGrid.ny();
        for (int k = box[4]; k < box[5]; k++) {
            double z = fineOz + k * fineSpacing - az;
            for (int j = box[2]; j < box[3]; j++) {
                double y = fineOy + j * fineSpacing - ay;
                int row = nx * (j + ny * k);
                for (int i = box[0]; i < box[1]; i++) {
                    double x = fineOx + i * fineSpacing - ax;
                    // Distance to the segment: project onto it and clamp the parameter to [0, 1].
                    double t = len2 > 0 ? (x * dx + y * dy + z * dz) / len2 : 0;
                    t = t < 0 ? 0 : (t > 1 ? 1 : t);
                    double ex = x - t * dx;
                    double ey = y - t * dy;
                    double ez = z - t * dz;
                    double d2 = ex * ex + ey * ey + ez * ez;
                    if (d2 < reach * reach) {
                        gland[row + i] += (float) (TUBE_AMPLITUDE * Math.exp(-d2 * inv2s2));
                    }
                }
            }
        }
    }

    private void splatBlob(double[] s, int o, int k0, int k1) {
        double sigma = s[o + 3];
        double reach = SPLAT_SIGMAS * sigma;
        double cx = s[o];
        double cy = s[o + 1];
        double cz = s[o + 2];
        int[] box = box(cx - reach, cx + reach, cy - reach, cy + reach, cz - reach, cz + reach, k0, k1);
        if (box == null) {
            return;
        }
        double inv2s2 = 1 / (2 * sigma * sigma);
        double amp = s[o + 4];
        int nx = fineGrid.nx();
        int ny = fineGrid.ny();
        for (int k = box[4]; k < box[5]; k++) {
            double z = fineOz + k * fineSpacing - cz;
            for (int j = box[2]; j < box[3]; j++) {
                double y = fineOy + j * fineSpacing - cy;
                int row = nx * (j + ny * k);
                for (int i = box[0]; i < box[1]; i++) {
                    double x = fineOx + i * fineSpacing - cx;
                    double d2 = x * x + y * y + z * z;
                    if (d2 < reach * reach) {
                        gland[row + i] += (float) (amp * Math.exp(-d2 * inv2s2));
                    }
                }
            }
        }
    }

    /** Fine-grid index box [i0, i1, j0, j1, k0, k1) of a world box, clipped to the slab; null if empty. */
    private int[] box(double x0, double x1, double y0, double y1, double z0, double z1, int k0, int k1) {
        int i0 = Math.max(0, (int) Math.ceil((x0 - fineOx) / fineSpacing));
        int i1 = Math.min(fineGrid.nx(), (int) Math.floor((x1 - fineOx) / fineSpacing) + 1);
        int j0 = Math.max(0, (int) Math.ceil((y0 - fineOy) / fineSpacing));
        int j1 = Math.min(fineGrid.ny(), (int) Math.floor((y1 - fineOy) / fineSpacing) + 1);
        int kk0 = Math.max(k0, (int) Math.ceil((z0 - fineOz) / fineSpacing));
        int kk1 = Math.min(k1, (int) Math.floor((z1 - fineOz) / fineSpacing) + 1);
        if (i0 >= i1 || j0 >= j1 || kk0 >= kk1) {
            return null;
        }
        return new int[] {i0, i1, j0, j1, kk0, kk1};
    }

    private static double smoothstep(double a, double b, double v) {
        double t = (v - a) / (b - a);
        t = t < 0 ? 0 : (t > 1 ? 1 : t);
        return t * t * (3 - 2 * t);
    }

    private static double smax(double a, double b, double k) {
        double h = Math.max(k - Math.abs(a - b), 0);
        return Math.max(a, b) + h * h / (4 * k);
    }

    /** Approximate signed distance (mm) under the torso surface (positive inside the torso). */
    public double torsoDepth(double x, double y) {
        double ax = x / TORSO_AX_MM;
        double ay = (y - TORSO_CY_MM) / TORSO_AY_MM;
        double r = Math.sqrt(ax * ax + ay * ay);
        if (r < 1e-9) {
            return TORSO_AY_MM;
        }
        double gx = ax / TORSO_AX_MM;
        double gy = ay / TORSO_AY_MM;
        return (1 - r) * r / Math.sqrt(gx * gx + gy * gy);
    }

    /** Approximate signed distance (mm) under the skin surface of the whole body (positive inside). */
    public double bodyDepth(double x, double y, double z) {
        double d = torsoDepth(x, y);
        for (BreastMound m : mounds) {
            double dm = smax(m.depth(x, y, z), m.nippleDepth(x, y, z), NIPPLE_BLEND_MM);
            d = smax(d, dm, MOUND_BLEND_MM);
        }
        return d;
    }

    /** Enveloped gland density at a point, trilinear on the fine grid (0 outside it). */
    public double glandDensity(double x, double y, double z) {
        double fx = (x - fineOx) / fineSpacing;
        double fy = (y - fineOy) / fineSpacing;
        double fz = (z - fineOz) / fineSpacing;
        return VoxelSampling.trilinear(gland, fineGrid.nx(), fineGrid.ny(), fineGrid.nz(), fx, fy, fz);
    }

    /** True if the point lies inside lesion {@code n}. */
    public boolean insideLesion(int n, double x, double y, double z) {
        int o = 15 * n;
        double dx = x - lesions[o];
        double dy = y - lesions[o + 1];
        double dz = z - lesions[o + 2];
        double a = (dx * lesions[o + 3] + dy * lesions[o + 4] + dz * lesions[o + 5]) / lesions[o + 12];
        double b = (dx * lesions[o + 6] + dy * lesions[o + 7] + dz * lesions[o + 8]) / lesions[o + 13];
        double c = (dx * lesions[o + 9] + dy * lesions[o + 10] + dz * lesions[o + 11]) / lesions[o + 14];
        return a * a + b * b + c * c <= 1;
    }

    /**
     * Tissue class at a reference point: {@link #AIR}, {@link #FAT}, {@link #GLAND}, {@link #SKIN},
     * {@link #MUSCLE}, {@link #LESION} or {@link #RIB_CAGE}; with the chest field of view the chest wall
     * under the muscle is {@link #BONE} (ribs, sternum), {@link #MUSCLE} (between ribs), {@link #LUNG} or
     * {@link #HEART}.
     *
     * @param skinMm thickness of the skin layer used (mm)
     */
    public int tissueClass(double x, double y, double z, double skinMm) {
        double dT = torsoDepth(x, y);
        if (dT >= SUBCUTANEOUS_FAT_MM) {
            if (dT < RIB_LAYER_MM) {
                return MUSCLE;
            }
            return ribZ.length == 0 ? RIB_CAGE : chestClass(x, y, z, dT);
        }
        double d = bodyDepth(x, y, z);
        if (d < 0) {
            return AIR;
        }
        if (d < skinMm) {
            return SKIN;
        }
        int nl = lesionCount();
        for (int n = 0; n < nl; n++) {
            if (insideLesion(n, x, y, z)) {
                return LESION;
            }
        }
        return glandDensity(x, y, z) >= GLAND_THRESHOLD ? GLAND : FAT;
    }

    /** Chest wall under the muscle with the chest field of view: bone, muscle between ribs, or lung. */
    private boolean inHeart(double x, double y, double z) {
        double a = (x - HEART_CENTRE_XY_MM[0]) / HEART_SEMI_AXES_MM[0];
        double b = (y - HEART_CENTRE_XY_MM[1]) / HEART_SEMI_AXES_MM[1];
        double c = (z - heartZ) / HEART_SEMI_AXES_MM[2];
        return a * a + b * b + c * c <= 1;
    }

    private int chestClass(double x, double y, double z, double dT) {
        if (dT >= RIB_LAYER_MM + RIB_THICKNESS_MM) {
            return inHeart(x, y, z) ? HEART : LUNG;
        }
        double ax = Math.abs(x);
        if (ax < STERNUM_HALF_WIDTH_MM) {
            return BONE;
        }
        double zc = z - RIB_RISE * ax;
        int i = java.util.Arrays.binarySearch(ribZ, zc);
        int at = i >= 0 ? i : -i - 1;
        for (int k = Math.max(0, at - 1); k <= Math.min(ribZ.length - 1, at); k++) {
            if (Math.abs(zc - ribZ[k]) < RIB_HALF_HEIGHT_MM) {
                return BONE;
            }
        }
        return MUSCLE;
    }

    /** Whether a tissue class is part of the chest wall (label 4). */
    public static boolean isChestWall(int tissueClass) {
        return tissueClass == MUSCLE || tissueClass == RIB_CAGE || tissueClass == BONE || tissueClass == LUNG
                || tissueClass == HEART;
    }

    /** Label (0–5, mechanics conventions) of a tissue class. */
    public static byte labelOf(int tissueClass) {
        return (byte) (isChestWall(tissueClass) ? MUSCLE : tissueClass);
    }

    /** Skin thickness used when rasterising at {@code spacingMm}: at least one voxel. */
    public static double rasterSkinMm(double spacingMm) {
        return Math.max(SKIN_MM, spacingMm);
    }

    /**
     * Label image of the reference anatomy on {@code g} (voxel centres), x fastest; skin at least one
     * voxel thick ({@link #rasterSkinMm}).
     */
    public byte[] rasterizeLabels(Grid3 g) {
        byte[] out = new byte[g.size()];
        double skin = rasterSkinMm(g.spacingMm(0));
        int nx = g.nx();
        int ny = g.ny();
        Parallel.forEachBlock(g.nz(), (long) g.size() * 8, k -> {
            double[] p = new double[3];
            for (int j = 0; j < ny; j++) {
                for (int i = 0; i < nx; i++) {
                    p[0] = i;
                    p[1] = j;
                    p[2] = k;
                    g.voxelToWorld().applyPoint(p, p);
                    out[i + nx * (j + ny * k)] = labelOf(tissueClass(p[0], p[1], p[2], skin));
                }
            }
        });
        return out;
    }

    public PhantomOptions options() {
        return options;
    }

    /** The image grid shared by the reference, prone and supine images. */
    public Grid3 grid() {
        return grid;
    }

    /** The fine grid of the gland density (half the image spacing). */
    public Grid3 fineGrid() {
        return fineGrid;
    }

    public int breastCount() {
        return mounds.length;
    }

    /** "right" or "left" for breast b. */
    public String side(int b) {
        return mounds[b].sideName();
    }

    /** Nipple tip of breast b on the skin surface (RAS mm, new array). */
    public double[] nipple(int b) {
        return new double[] {nipples[3 * b], nipples[3 * b + 1], nipples[3 * b + 2]};
    }

    public int lesionCount() {
        return lesions.length / 15;
    }

    /** Centre of lesion n (RAS mm, new array). */
    public double[] lesionCentre(int n) {
        return new double[] {lesions[15 * n], lesions[15 * n + 1], lesions[15 * n + 2]};
    }

    /** Semi-axes of lesion n (mm, new array). */
    public double[] lesionSemiAxes(int n) {
        return new double[] {lesions[15 * n + 12], lesions[15 * n + 13], lesions[15 * n + 14]};
    }

    /** Side ("right"/"left") of the breast holding lesion n. */
    public String lesionSide(int n) {
        return mounds[n % mounds.length].sideName();
    }

    /** Duct branch points of all breasts (3 per point, RAS mm, reference configuration), a new array. */
    public double[] branchPoints() {
        int total = 0;
        for (DuctalTree t : trees) {
            total += t.branchCount;
        }
        double[] out = new double[3 * total];
        int o = 0;
        for (DuctalTree t : trees) {
            System.arraycopy(t.branchPoints, 0, out, o, 3 * t.branchCount);
            o += 3 * t.branchCount;
        }
        return out;
    }

    /** Mound axis e_n of breast b (unit, new array). */
    public double[] moundAxis(int b) {
        return mounds[b].en.clone();
    }
}
