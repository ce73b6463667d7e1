package org.turnmark.app.gui;

import java.nio.file.Path;

/**
 * An image the viewer can show: a display name, its NIfTI file and the posture whose frame it is in.
 *
 * @param name    e.g. "prone image", "supine image", "prone warped to supine (hybrid)"
 * @param path    NIfTI-1 file
 * @param posture frame of the image (decides which overlays are drawn on it)
 */
public record ImageChoice(String name, Path path, Overlay.Posture posture) {

    @Override
    public String toString() {
        return name;
    }
}
