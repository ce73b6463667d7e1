package org.turnmark.app.cli;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.concurrent.Callable;

import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

import org.turnmark.app.gui.GuiLauncher;

/**
 * {@code turnmark gui [CASE.json | PLAN_DIR]}: the desktop front end. Opens a case file (to check the
 * inputs, place lesion marks and run the plan) or a plan output folder (to review the predictions),
 * or starts empty. Blocks until the window is closed.
 */
@Command(name = "gui",
        header = "Opens the desktop window.",
        mixinStandardHelpOptions = true,
        description = {
            "Opens the desktop window: three orthogonal slice views of the prone image with lesion marks",
            "placed by clicking (world RAS mm), a background plan run with progress and cancel, and the",
            "predicted supine positions per method with their 95 %% ellipsoids. Also reviews an existing",
            "plan output folder. Needs a graphical display (on a server: xvfb-run -a turnmark gui ...).",
            "",
            Caution.SHORT})
final class GuiCommand implements Callable<Integer> {

    @CommandLine.Spec
    private CommandLine.Model.CommandSpec spec;

    @Parameters(arity = "0..1", paramLabel = "CASE.json|PLAN_DIR",
            description = "A case file (docs/case-format.md) or a plan output folder holding plan.json.")
    private Path open;

    @Option(names = "--threads", paramLabel = "N", description = "Worker threads for planning (default: all cores).")
    private Integer threads;

    @Override
    public Integer call() {
        if (threads != null && threads < 1) {
            throw new UserInputException("--threads must be >= 1, got " + threads);
        }
        if (open != null) {
            if (!Files.exists(open)) {
                throw new UserInputException("no such case file or plan folder: " + open);
            }
            if (Files.isDirectory(open) && !Files.isRegularFile(open.resolve("plan.json"))) {
                throw new UserInputException(open + " is a folder without plan.json: give a case file (.json) "
                        + "or a plan output folder");
            }
        }
        if (!displayAvailable()) {
            throw new UserInputException("no graphical display (DISPLAY and WAYLAND_DISPLAY are not set); "
                    + "on a server run: xvfb-run -a turnmark gui ...");
        }
        spec.commandLine().getErr().println(Caution.SHORT);
        spec.commandLine().getErr().flush();
        GuiLauncher.launch(open);
        return 0;
    }

    private static boolean displayAvailable() {
        return notBlank(System.getenv("DISPLAY")) || notBlank(System.getenv("WAYLAND_DISPLAY"))
                || "Monocle".equals(System.getProperty("glass.platform"));
    }

    private static boolean notBlank(String s) {
        return s != null && !s.isBlank();
    }
}
