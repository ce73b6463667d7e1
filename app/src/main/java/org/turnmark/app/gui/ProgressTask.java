package org.turnmark.app.gui;

import java.util.concurrent.atomic.AtomicBoolean;

import javafx.concurrent.Task;

import org.turnmark.geom.Progress;

/**
 * A {@link Task} running plain-Java work that reports through the pipeline's {@link Progress}: each
 * {@code update(stage, fraction)} becomes the task's message (the stage name) and progress (the
 * fraction reported; the planner reports the fraction of the whole run), and {@link Progress#isCancelled()} is true once {@link #requestStop()} was called
 * (or the task was cancelled), so the work stops at its next check with
 * {@link Progress.CancelledException}. {@link #requestStop()} keeps the task running until the work has
 * actually ended, so the caller learns of the end through the usual failed/succeeded callbacks and
 * never starts a second run beside a stopping one.
 *
 * @param <T> result type
 */
public final class ProgressTask<T> extends Task<T> {

    /** Work that reports progress and honours cancellation. */
    @FunctionalInterface
    public interface Work<T> {
        /** Runs on a background thread. */
        T run(Progress progress) throws Exception;
    }

    private final Work<T> work;
    private final AtomicBoolean stopRequested = new AtomicBoolean();

    public ProgressTask(Work<T> work) {
        this.work = work;
    }

    @Override
    protected T call() throws Exception {
        Progress p = new Progress() {
            @Override
            public void update(String stage, double fraction) {
                double f = Double.isFinite(fraction) ? Math.max(0, Math.min(1, fraction)) : 0;
                updateMessage(stage);
                updateProgress(f, 1.0);
            }

            @Override
            public boolean isCancelled() {
                return stopRequested.get() || ProgressTask.this.isCancelled();
            }
        };
        return work.run(p);
    }

    /** Asks the work to stop at its next {@link Progress#checkCancelled()}; thread safe. */
    public void requestStop() {
        stopRequested.set(true);
    }

    /** True once {@link #requestStop()} was called. */
    public boolean isStopRequested() {
        return stopRequested.get();
    }
}
