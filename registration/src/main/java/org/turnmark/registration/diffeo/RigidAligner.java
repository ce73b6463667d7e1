package org.turnmark.registration.diffeo;

import java.util.ArrayList;
import java.util.List;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.geom.Progress;
import org.turnmark.registration.transform.DisplacementFields;
import org.turnmark.registration.volume.VectorField;

/**
 * Rigid alignment alone, coarse to fine: at each requested pyramid level the rigid pre-alignment of
 * {@link DiffeomorphicRegistration} (BOBYQA over translation and rotation, {@link PreAligner}) is
 * started from the previous result and restarted from its own result while it still lowers the cost by
 * more than {@link #RESTART_GAIN} (relative), at most {@link #MAX_ROUNDS} times per level. A restart gives
 * BOBYQA a fresh trust region about the new point, which matters when the first run stops early in a
 * shallow valley. The similarity, its settings and the masks are those of the configuration and the
 * input; the input's initial field is not used (the start affine plays its part).
 *
 * <p>The moving mask, when given, restricts the similarity to fixed voxels whose image under the map
 * lies in it: for example the chest wall of the moving image, so that the torso alone decides.
 */
public final class RigidAligner {

    /** Relative cost decrease below which a level stops restarting. */
    public static final double RESTART_GAIN = 1e-4;
    /** Most BOBYQA runs per level. */
    public static final int MAX_ROUNDS = 6;

    private RigidAligner() {
    }

    /**
     * One level's outcome.
     *
     * @param level     pyramid level (about 2^level times the finest spacing)
     * @param spacingMm the level's grid spacing (mm, smallest axis)
     * @param rounds    BOBYQA runs made
     * @param costStart cost of the start affine at this level
     * @param costEnd   cost of the result at this level
     */
    public record LevelOutcome(int level, double spacingMm, int rounds, double costStart, double costEnd) {
    }

    /**
     * The result.
     *
     * @param fixedToMoving the rigid map from fixed world to moving world (RAS mm)
     * @param levels        per level, coarsest first
     */
    public record Result(Affine3D fixedToMoving, List<LevelOutcome> levels) {
    }

    /**
     * Aligns the moving image of {@code in} to its fixed image.
     *
     * @param config   similarity settings (metric, LNCC window, MI bins); its pre-alignment and
     *                 iterations are not used
     * @param in       images and masks
     * @param start    start map (fixed world → moving world); identity when null
     * @param levels   pyramid levels to run, coarsest first (each ≥ 0)
     * @param progress progress sink ("rigid alignment")
     */
    public static Result align(RegistrationConfig config, RegistrationInput in, Affine3D start, int[] levels,
                               Progress progress) {
        return align(config, in, start, levels, 0, 0, progress);
    }

    /**
     * Aligns from several starts: each start map followed by every translation of a cubic lattice of
     * {@code 2·halfSteps + 1} points per axis, {@code stepMm} apart (the start itself at its centre). Each
     * runs at the coarsest level; per start map the {@link #KEEP} with the lowest cost there go on through
     * the finer levels, and the one with the lowest cost at the finest level is the result.
     *
     * @param starts    start maps (fixed world → moving world); at least one
     * @param stepMm    spacing of the start lattice (mm); 0 with halfSteps 0 for the starts alone
     * @param halfSteps lattice points on each side of a start per axis (0..3)
     */
    public static Result align(RegistrationConfig config, RegistrationInput in, Affine3D start, int[] levels,
                               double stepMm, int halfSteps, Progress progress) {
        return alignFromStarts(config, in, List.of(start == null ? Affine3D.identity() : start), levels, stepMm,
                halfSteps, progress);
    }

    /** As {@link #align(RegistrationConfig, RegistrationInput, Affine3D, int[], double, int, Progress)} from several start maps. */
    public static Result alignFromStarts(RegistrationConfig config, RegistrationInput in, List<Affine3D> starts, int[] levels,
                               double stepMm, int halfSteps, Progress progress) {
        if (levels == null || levels.length == 0) {
            throw new IllegalArgumentException("levels must list at least one pyramid level");
        }
        for (int l : levels) {
            if (l < 0 || l >= RegistrationConfig.MAX_LEVELS) {
                throw new IllegalArgumentException("levels must be in [0, " + (RegistrationConfig.MAX_LEVELS - 1)
                        + "], got " + l);
            }
        }
        if (halfSteps < 0 || halfSteps > 3 || !(stepMm >= 0) || (halfSteps > 0 && !(stepMm > 0))) {
            throw new IllegalArgumentException("start lattice: halfSteps must be in [0, 3] and stepMm > 0 with "
                    + "halfSteps > 0, got " + halfSteps + " and " + stepMm);
        }
        if (starts == null || starts.isEmpty()) {
            throw new IllegalArgumentException("at least one start map must be given");
        }
        Progress p = progress == null ? Progress.NONE : progress;
        Context ctx = new Context(config, in);
        int side = 2 * halfSteps + 1;
        int perStart = side * side * side;
        int keep = Math.min(KEEP, perStart);
        double coarseShare = perStart / (double) (perStart + keep * (levels.length - 1) * 4);
        int total = starts.size() * perStart;
        List<Candidate> go = new ArrayList<>();
        int done = 0;
        for (Affine3D s0 : starts) {
            Candidate[] cands = new Candidate[perStart];
            for (int q = 0; q < perStart; q++) {
                double dx = (q % side - halfSteps) * stepMm;
                double dy = ((q / side) % side - halfSteps) * stepMm;
                double dz = (q / (side * side) - halfSteps) * stepMm;
                cands[q] = new Candidate(Affine3D.translation(dx, dy, dz).compose(s0), new ArrayList<>());
                cands[q].refine(ctx, levels[0]);
                p.update("rigid alignment", coarseShare * ++done / total);
            }
            java.util.Arrays.sort(cands, java.util.Comparator.comparingDouble(Candidate::lastCost));
            go.addAll(List.of(cands).subList(0, keep));
        }
        Candidate best = null;
        for (int c = 0; c < go.size(); c++) {
            for (int li = 1; li < levels.length; li++) {
                go.get(c).refine(ctx, levels[li]);
            }
            p.update("rigid alignment", coarseShare + (1 - coarseShare) * (c + 1) / go.size());
            if (best == null || go.get(c).lastCost() < best.lastCost()) {
                best = go.get(c);
            }
        }
        return new Result(best.affine, List.copyOf(best.levels));
    }

    /** Candidates taken from the coarsest level to the finer ones. */
    public static final int KEEP = 3;

    /** Images and masks prepared once. */
    private static final class Context {
        final RegistrationConfig config;
        final RegistrationInput in;
        final DiffeomorphicRegistration reg;
        final byte[] movingMaskBytes;
        final float[] movingMaskData;

        Context(RegistrationConfig config, RegistrationInput in) {
            this.config = config;
            this.in = in;
            this.reg = new DiffeomorphicRegistration(config);
            this.movingMaskBytes = Pyramid.mask(in.movingMask(), in.moving().grid());
            this.movingMaskData = in.movingMask() == null ? null : in.movingMask().data();
        }
    }

    private static final class Candidate {
        Affine3D affine;
        final List<LevelOutcome> levels;

        Candidate(Affine3D affine, List<LevelOutcome> levels) {
            this.affine = affine;
            this.levels = levels;
        }

        double lastCost() {
            return levels.get(levels.size() - 1).costEnd();
        }

        /** Runs one level from the current affine, restarting while it improves. */
        void refine(Context ctx, int level) {
            RegistrationInput in = ctx.in;
            Grid3 fine = in.fixed().grid();
            Grid3 g = Pyramid.grid(fine, level);
            float[] f = Pyramid.image(in.fixed(), g, Pyramid.sigmaMm(fine, level));
            byte[] m = Pyramid.mask(in.fixedMask(), g);
            float[] mov = ctx.reg.movingAtLevel(in.moving(), fine, level);
            double levelScale = Math.pow(2, level);
            double[] centre = DiffeomorphicRegistration.centreOfMass(f, m, g);
            double costStart = Double.NaN;
            double cost = Double.NaN;
            int rounds = 0;
            while (rounds < MAX_ROUNDS) {
                // the current affine enters as the solver's initial field (fine grid); the pre-alignment's
                // own affine is applied after it
                VectorField phi0 = DisplacementFields.fromAffine(affine, fine);
                LevelSolver solver = new LevelSolver(ctx.config, g, f, m, mov, in.moving().grid(), ctx.movingMaskData,
                        phi0, null, ctx.reg.metricFor(g, f, m, mov, ctx.movingMaskBytes, in, false), null,
                        ctx.config.maxStepMm() * levelScale, levelScale);
                DiffeomorphicRegistration.checkOverlap(solver, g, in);
                double before = solver.evaluate(VectorField.zeros(g));
                if (rounds == 0) {
                    costStart = before;
                    cost = before;
                }
                Affine3D a = PreAligner.align(solver, g, centre, new double[3], PreAlignment.RIGID);
                double after = solver.evaluate(VectorField.zeros(g));
                rounds++;
                if (!(after < cost)) {
                    break;
                }
                boolean small = cost - after <= RESTART_GAIN * Math.max(Math.abs(cost), 1e-12);
                affine = a.compose(affine);
                cost = after;
                if (small) {
                    break;
                }
            }
            levels.add(new LevelOutcome(level, Math.min(g.spacingMm(0), Math.min(g.spacingMm(1), g.spacingMm(2))),
                    rounds, costStart, cost));
        }
    }
}
