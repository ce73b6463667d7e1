package org.turnmark.app.cli;

/**
 * Applies {@code --threads N} (anywhere on the command line) before any parallel work starts, by
 * setting the {@code turnmark.threads} property that sizes {@code org.turnmark.geom.Parallel}'s pool.
 * Commands also declare the option so that it appears in their help.
 */
final class ThreadsOption {

    private ThreadsOption() {
    }

    /**
     * Sets the thread count from {@code args}.
     *
     * @return null when the option is absent or valid, else a one-line message for a value below 1
     *         (a non-number is left to picocli, which names it when it parses the option)
     */
    static String applyFromArgs(String[] args) {
        for (int n = 0; n < args.length; n++) {
            String v = null;
            if (args[n].equals("--threads") && n + 1 < args.length) {
                v = args[n + 1];
            } else if (args[n].startsWith("--threads=")) {
                v = args[n].substring("--threads=".length());
            }
            if (v != null) {
                try {
                    int t = Integer.parseInt(v.trim());
                    if (t < 1) {
                        return "--threads must be >= 1, got " + t;
                    }
                    System.setProperty(org.turnmark.geom.Parallel.THREADS_PROPERTY, Integer.toString(t));
                } catch (NumberFormatException e) {
                    // picocli reports the malformed value when it parses the option.
                }
            }
        }
        return null;
    }
}
