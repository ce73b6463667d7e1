package org.turnmark.app.gui;

/** One line of a two-column table: what, and its value in plain words with units. */
public record InfoRow(String key, String value) {
}
