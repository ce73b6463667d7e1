package org.turnmark.app.gui;

import java.nio.file.Path;
import java.util.logging.Level;
import java.util.logging.Logger;

import javafx.application.Application;

/**
 * Starts the desktop application and blocks until its window closes. A plain class (not an
 * {@link Application}) so that JavaFX loaded from the classpath of the shaded jar starts normally.
 */
public final class GuiLauncher {

    /**
     * JavaFX's own logger. Running from the classpath of the shaded jar is how Turnmark ships, so its
     * one-time warning about that setup is expected and is kept off the console; real errors still show.
     * Held in a field because the logging framework keeps loggers only weakly.
     */
    private static final Logger JAVAFX_LOG = Logger.getLogger("javafx");

    private GuiLauncher() {
    }

    /**
     * @param open a case file or plan folder to open at start, or null
     */
    public static void launch(Path open) {
        JAVAFX_LOG.setLevel(Level.SEVERE);
        String[] args = open == null ? new String[0] : new String[] {open.toAbsolutePath().toString()};
        Application.launch(TurnmarkApp.class, args);
    }
}
