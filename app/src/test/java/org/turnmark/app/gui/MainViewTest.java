package org.turnmark.app.gui;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.concurrent.TimeUnit;

import javafx.geometry.Point2D;
import javafx.scene.Scene;
import javafx.scene.control.Button;
import javafx.scene.control.Label;
import javafx.scene.control.TableView;
import javafx.scene.control.TextField;
import javafx.scene.input.MouseButton;
import javafx.stage.Stage;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;
import org.testfx.api.FxRobot;
import org.testfx.robot.Motion;
import org.testfx.framework.junit5.ApplicationExtension;
import org.testfx.framework.junit5.Start;
import org.testfx.util.WaitForAsyncUtils;

import org.turnmark.geom.ResearchUse;

/** The window driven headless (Monocle): banner, opening a case, placing a mark by clicking, run state. */
@ExtendWith(ApplicationExtension.class)
class MainViewTest {

    /**
     * A click lands on a whole screen pixel: the world point under it is within one display pixel
     * (2.5 mm here, the finest voxel spacing) of the aimed point, per in-plane axis.
     */
    private static final double CLICK_MM = 2.5;

    @TempDir
    static Path dir;
    private static Path caseFile;
    private StepLauncher launcher;
    private MainViewModel vm;

    @BeforeAll
    static void data() throws Exception {
        caseFile = GuiTestData.writeCase(dir);
        java.util.logging.Logger.getLogger("javafx").setLevel(java.util.logging.Level.SEVERE);
    }

    @Start
    void start(Stage stage) {
        launcher = new StepLauncher(caseFile);
        vm = new MainViewModel(launcher);
        stage.setScene(new Scene(new MainView(vm), 1180, 740));
        stage.show();
    }

    @AfterEach
    void stop() {
        launcher.release.countDown();
        Fx.run(vm::shutdown);
    }

    private void openCase(FxRobot robot) {
        robot.interact(() -> vm.open(caseFile));
        Fx.waitFor("prone image shown", () -> vm.viewer().volumeProperty().get() != null);
        WaitForAsyncUtils.waitForFxEvents();
    }

    @Test
    void cautionBannerIsVisibleWithTheFullText(FxRobot robot) {
        Label banner = robot.lookup("#caution-banner").queryAs(Label.class);
        assertTrue(banner.isVisible());
        assertEquals(ResearchUse.FULL, banner.getText());
        assertTrue(banner.getHeight() > 0, "banner laid out");
        openCase(robot);
        assertTrue(banner.isVisible(), "still visible with a case open");
    }

    @Test
    void openingACaseFillsTheInputsAndEnablesRun(FxRobot robot) {
        openCase(robot);
        TableView<?> inputs = robot.lookup("#inputs-table").queryAs(TableView.class);
        assertTrue(inputs.getItems().size() >= 6);
        assertFalse(robot.lookup("#run-plan").queryAs(Button.class).isDisabled());
        assertTrue(robot.lookup("#cancel-plan").queryAs(Button.class).isDisabled());
        assertEquals("Turnmark — case gui-test", vm.titleProperty().get());
    }

    @Test
    void clickingTheAxialViewPlacesTheMarkThere(FxRobot robot) {
        openCase(robot);
        SliceView axial = robot.lookup("#slice-axial").queryAs(SliceView.class);
        // Aim at a point on the current axial plane (z of the crosshair).
        double[] target = {-10.0, -5.0, vm.viewer().crosshair()[2]};
        Point2D local = Fx.call(() -> {
            double[] s = axial.screenOfWorld(target);
            return axial.localToScreen(s[0], s[1]);
        });
        robot.moveTo(local, Motion.DIRECT).clickOn(MouseButton.PRIMARY);
        WaitForAsyncUtils.waitForFxEvents();
        double[] mark = vm.marks().get("L1");
        assertEquals(target[0], mark[0], CLICK_MM);
        assertEquals(target[1], mark[1], CLICK_MM);
        assertEquals(target[2], mark[2], 0.0, "the axial view keeps z");
        assertArrayEquals(mark, new double[] {vm.markXProperty().get(), vm.markYProperty().get(),
            vm.markZProperty().get()}, 0.0);
    }

    @Test
    void typingACoordinateMovesTheMark(FxRobot robot) {
        openCase(robot);
        TextField x = robot.lookup("#mark-x").queryAs(TextField.class);
        robot.interact(() -> {
            x.setText("-12.5");
            x.commitValue();
        });
        assertEquals(-12.5, vm.marks().get("L1")[0], 0.0);
    }

    @Test
    void runButtonIsDisabledWhileThePlanRuns(FxRobot robot) throws Exception {
        openCase(robot);
        robot.clickOn("#run-plan");
        assertTrue(launcher.started.await(Fx.MAX_WAIT_SECONDS, TimeUnit.SECONDS));
        WaitForAsyncUtils.waitForFxEvents();
        assertTrue(robot.lookup("#run-plan").queryAs(Button.class).isDisabled());
        assertFalse(robot.lookup("#cancel-plan").queryAs(Button.class).isDisabled());
        launcher.release.countDown();
        Fx.waitFor("plan shown", () -> !vm.results().isEmpty());
        WaitForAsyncUtils.waitForFxEvents();
        assertTrue(robot.lookup("#run-plan").queryAs(Button.class).isDisabled(), "plan review has nothing to run");
        assertEquals(4, robot.lookup("#results-table").queryAs(TableView.class).getItems().size());
    }
}
