/** The {@code turnmark} command line: the only code that writes to the standard streams. */
package org.turnmark.app.cli;
