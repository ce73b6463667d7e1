package org.turnmark.app.cli;

/** The research-use-only caution, as printed by the command line. */
public final class Caution {

    /** One line, for help texts, CSV comment lines and NIfTI descrip (see the full text in the docs). */
    public static final String SHORT = org.turnmark.geom.ResearchUse.SHORT;

    private Caution() {
    }
}
