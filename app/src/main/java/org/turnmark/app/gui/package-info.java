/**
 * The desktop front end (JavaFX, Model–View–ViewModel). ViewModels ({@code *ViewModel}) hold state
 * as JavaFX properties only and never touch the scene graph, so they are tested without a window;
 * views bind to them. Slice geometry, rendering and overlay maths are plain Java
 * ({@link org.turnmark.app.gui.SliceFrame}, {@link org.turnmark.app.gui.SliceRenderer},
 * {@link org.turnmark.app.gui.EllipseSection}). Long work runs in a {@code javafx.concurrent.Task}
 * that adapts the pipeline's plain-Java {@link org.turnmark.geom.Progress}. Coordinates are world
 * RAS+ millimetres throughout.
 */
package org.turnmark.app.gui;
