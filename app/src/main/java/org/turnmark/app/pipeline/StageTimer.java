package org.turnmark.app.pipeline;

import java.util.LinkedHashMap;
import java.util.Map;

import org.turnmark.geom.Progress;

/**
 * Named stages of a plan with their share of the total work, for one progress fraction across the
 * run (so a front end can estimate the time left) and the wall time of each stage. Not thread safe;
 * the returned sub-progress objects are as thread safe as the parent.
 */
final class StageTimer {

    private final Progress parent;
    private final Map<String, Double> weights = new LinkedHashMap<>();
    private final Map<String, Double> seconds = new LinkedHashMap<>();
    private final double total;
    private double done;
    private String current;
    private long start;

    StageTimer(Progress parent, Map<String, Double> weights) {
        this.parent = parent;
        this.weights.putAll(weights);
        double t = 0;
        for (double w : weights.values()) {
            t += w;
        }
        this.total = t;
    }

    /** Starts a stage (ending the previous one); returns its progress view. */
    Progress begin(String stage) {
        end();
        parent.checkCancelled();
        current = stage;
        start = System.nanoTime();
        double w = weights.getOrDefault(stage, 0.0);
        double from = done / total;
        double to = (done + w) / total;
        Progress p = parent.sub(stage, from, Math.min(1, to));
        p.update(stage, 0);
        return p;
    }

    /** Ends the current stage, recording its time. */
    void end() {
        if (current != null) {
            seconds.merge(current, (System.nanoTime() - start) / 1e9, Double::sum);
            done += weights.getOrDefault(current, 0.0);
            current = null;
        }
    }

    /** Skips a stage that does not apply (its share counts as done). */
    void skip(String stage) {
        done += weights.getOrDefault(stage, 0.0);
    }

    Map<String, Double> seconds() {
        return new LinkedHashMap<>(seconds);
    }
}
