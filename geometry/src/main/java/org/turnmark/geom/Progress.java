package org.turnmark.geom;

/**
 * Progress and cancellation for long computations. Numerical code calls {@link #update} with the
 * fraction done of the current stage and {@link #checkCancelled()} between iterations; front ends
 * (progress bar, GUI task) implement it. Implementations must be thread safe.
 */
public interface Progress {

    /** A sink that ignores reports and never cancels. */
    Progress NONE = (stage, fraction) -> { };

    /**
     * Reports progress.
     *
     * @param stage    short human-readable stage name, e.g. "supine reload"
     * @param fraction fraction of that stage done, in [0, 1]
     */
    void update(String stage, double fraction);

    /** True once the user asked to stop; the computation should end soon with {@link CancelledException}. */
    default boolean isCancelled() {
        return false;
    }

    /** Throws {@link CancelledException} if cancellation was requested. */
    default void checkCancelled() {
        if (isCancelled()) {
            throw new CancelledException();
        }
    }

    /**
     * A view that maps this stage's [0, 1] into [from, to] of the parent's fraction and keeps the
     * parent's cancellation, for nesting sub-steps under one stage name.
     */
    default Progress sub(String stage, double from, double to) {
        Progress parent = this;
        return new Progress() {
            @Override
            public void update(String ignored, double fraction) {
                double f = Math.max(0, Math.min(1, fraction));
                parent.update(stage, from + (to - from) * f);
            }

            @Override
            public boolean isCancelled() {
                return parent.isCancelled();
            }
        };
    }

    /** Thrown when a computation stops because the user cancelled it. */
    final class CancelledException extends RuntimeException {
        private static final long serialVersionUID = 1L;

        public CancelledException() {
            super("cancelled by the user");
        }
    }
}
