package org.turnmark.app.cli;

/**
 * Applies {@code --threads N} (anywhere on the command line) before any parallel work starts, by
 * setting the {@code turnmark.threads} property that sizes {@code org.turnmark.geom.Parallel}'s pool.
 * Commands also declare the option so that it appears in their help.
 */
final class ThreadsOption {

    private ThreadsOption() {
    }

    static void applyFromArgs(String[] args) {
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
                    if (t >= 1) {
                        System.setProperty(org.turnmark.geom.Parallel.THREADS_PROPERTY, Integer.toString(t));
                    }
                } catch (NumberFormatException e) {
                    // picocli reports the malformed value when it parses the option.
                }
            }
        }
    }
}
