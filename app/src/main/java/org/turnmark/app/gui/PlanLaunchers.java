package org.turnmark.app.gui;

/** The plan launchers the GUI can use. */
final class PlanLaunchers {

    private PlanLaunchers() {
    }

    /** Runs the planning pipeline; null while this build has no pipeline to run. */
    static PlanLauncher pipeline() {
        return null;
    }
}
