package org.turnmark.app.gui;

import java.nio.file.Path;

import javafx.application.Application;

/**
 * Starts the desktop application and blocks until its window closes. A plain class (not an
 * {@link Application}) so that JavaFX loaded from the classpath of the shaded jar starts normally.
 */
public final class GuiLauncher {

    private GuiLauncher() {
    }

    /**
     * @param open a case file or plan folder to open at start, or null
     */
    public static void launch(Path open) {
        String[] args = open == null ? new String[0] : new String[] {open.toAbsolutePath().toString()};
        Application.launch(TurnmarkApp.class, args);
    }
}
