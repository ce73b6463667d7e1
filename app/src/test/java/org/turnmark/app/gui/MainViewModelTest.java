package org.turnmark.app.gui;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.logging.Level;
import java.util.logging.Logger;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import org.turnmark.app.pipeline.CaseFile;
import org.turnmark.app.pipeline.CaseFileReader;
import org.turnmark.geom.ResearchUse;

/** The main ViewModel driven without a window (toolkit started headless for its property threading). */
class MainViewModelTest {

    /** Mark coordinates pass through text-free double properties: exact. */
    private static final double EXACT = 0.0;

    @TempDir
    Path dir;
    private Path caseFile;
    private StepLauncher launcher;
    private MainViewModel vm;

    @BeforeAll
    static void toolkit() {
        Fx.start();
        // Expected failures are logged by the ViewModel; keep the test output silent.
        Logger.getLogger(MainViewModel.class.getName()).setLevel(Level.OFF);
    }

    @BeforeEach
    void open() throws Exception {
        caseFile = GuiTestData.writeCase(dir);
        launcher = new StepLauncher(caseFile);
        vm = Fx.call(() -> new MainViewModel(launcher));
        Fx.run(() -> vm.open(caseFile));
        Fx.waitFor("prone image shown", () -> vm.viewer().volumeProperty().get() != null);
    }

    @AfterEach
    void close() {
        launcher.release.countDown();
        Fx.run(vm::shutdown);
    }

    @Test
    void openingACaseShowsItsInputsTheProneImageAndTheFirstMark() {
        Fx.run(() -> {
            assertEquals(MainViewModel.Mode.CASE, vm.modeProperty().get());
            assertEquals("prone image", vm.viewer().imageProperty().get().name());
            assertEquals(Overlay.Posture.PRONE, vm.viewer().posture());
            assertEquals(List.of("L1", "L2"), vm.lesionIds());
            assertEquals(0, vm.selectedLesionProperty().get());
            assertEquals(-30.0, vm.markXProperty().get(), EXACT);
            assertEquals(20.0, vm.markYProperty().get(), EXACT);
            assertEquals(5.0, vm.markZProperty().get(), EXACT);
            assertTrue(vm.inputs().stream().anyMatch(r -> r.key().equals("Supine image")
                    && r.value().startsWith("supine.nii.gz")));
            assertTrue(vm.viewer().crosshairTextProperty().get().contains("mm"));
            assertFalse(vm.runDisabledProperty().get());
            assertTrue(vm.caution().equals(ResearchUse.FULL));
        });
    }

    @Test
    void aMarkGivenAsVoxelIndicesIsShownInWorldMillimetres() {
        // L2 is voxel (10, 20, 12) of the x-flipped 2.5 mm grid: x = −2.5·10 + 48.75, y = 2.5·20 − 43.75,
        // z = 2.5·12 − 28.75 (the grid's affine, GuiTestData.grid()).
        Fx.run(() -> vm.selectedLesionProperty().set(1));
        Fx.run(() -> {
            assertEquals(23.75, vm.markXProperty().get(), 1e-12);
            assertEquals(6.25, vm.markYProperty().get(), 1e-12);
            assertEquals(1.25, vm.markZProperty().get(), 1e-12);
        });
    }

    @Test
    void clickingTheProneImageMovesTheCrosshairAndTheSelectedMark() {
        double[] p = {-20.0, 10.0, -2.5};
        Fx.run(() -> vm.clickAt(p));
        Fx.run(() -> {
            assertArrayEquals(p, vm.viewer().crosshair(), EXACT);
            assertArrayEquals(p, vm.marks().get("L1"), EXACT);
            CaseFile edited = vm.editedCase();
            assertArrayEquals(p, edited.lesions().get(0).positionRasMm(), EXACT);
            assertTrue(vm.viewer().overlays().stream().anyMatch(o -> o.kind() == Overlay.Kind.LESION_MARK
                    && o.label().equals("L1") && o.centerRasMm()[0] == p[0]));
        });
        Fx.run(() -> vm.placeMarkOnClickProperty().set(false));
        Fx.run(() -> vm.clickAt(new double[] {0, 0, 0}));
        Fx.run(() -> assertArrayEquals(p, vm.marks().get("L1"), EXACT, "mark stays when placing is off"));
    }

    @Test
    void editedNumericFieldsMoveTheMarkAndAMarkOutsideTheImageIsReported() {
        Fx.run(() -> vm.markXProperty().set(-12.5));
        Fx.run(() -> assertEquals(-12.5, vm.marks().get("L1")[0], EXACT));
        Fx.run(() -> vm.markZProperty().set(500));
        Fx.run(() -> assertTrue(vm.errorProperty().get().contains("outside the prone image"),
                vm.errorProperty().get()));
    }

    @Test
    void savedCaseKeepsTheEditedMarkAndReadsBack() throws Exception {
        Fx.run(() -> vm.clickAt(new double[] {-25.0, 15.0, 2.5}));
        Path saved = dir.resolve("edited.json");
        Fx.run(() -> vm.saveCaseAs(saved));
        CaseFile back = new CaseFileReader().read(saved);
        assertArrayEquals(new double[] {-25.0, 15.0, 2.5}, back.lesions().get(0).positionRasMm(), EXACT);
        assertNull(back.lesions().get(0).positionVoxel());
        try (var s = Files.list(dir)) {
            assertTrue(s.noneMatch(f -> f.getFileName().toString().endsWith(".tmp")), "no temporary file left");
        }
    }

    @Test
    void runningAPlanReportsStagesDisablesRunAndShowsTheResults() throws Exception {
        Fx.run(() -> vm.clickAt(new double[] {-27.5, 17.5, 5.0}));
        Fx.run(vm::runPlan);
        assertTrue(launcher.started.await(Fx.MAX_WAIT_SECONDS, TimeUnit.SECONDS));
        Fx.waitFor("stage shown", () -> "segmentation".equals(vm.stageProperty().get()));
        Fx.run(() -> {
            assertTrue(vm.runningProperty().get());
            assertTrue(vm.runDisabledProperty().get(), "no second run while one is running");
            assertEquals(0.25, vm.progressProperty().get(), EXACT);
        });
        assertArrayEquals(new double[] {-27.5, 17.5, 5.0}, launcher.received.lesions().get(0).positionRasMm(), EXACT);
        launcher.release.countDown();
        Fx.waitFor("results shown", () -> vm.modeProperty().get() == MainViewModel.Mode.PLAN
                && !vm.results().isEmpty() && vm.viewer().volumeProperty().get() != null);
        Fx.run(() -> {
            assertFalse(vm.runningProperty().get());
            assertEquals(4, vm.results().size());
            assertEquals("hybrid", vm.results().get(3).method());
            assertEquals(3, vm.flags().size());
            assertTrue(vm.planFolderTextProperty().get().contains("report.pdf"));
            assertEquals(Overlay.Posture.SUPINE, vm.viewer().posture());
            assertArrayEquals(new double[] {-36.5, -4, 8}, vm.viewer().crosshair(), EXACT,
                    "crosshair on the first supine-frame prediction");
        });
    }

    @Test
    void cancellingReachesTheWorkThroughProgressAndEndsTheRun() throws Exception {
        Fx.run(vm::runPlan);
        assertTrue(launcher.started.await(Fx.MAX_WAIT_SECONDS, TimeUnit.SECONDS));
        Fx.run(vm::cancelPlan);
        Fx.waitFor("run ended", () -> !vm.runningProperty().get());
        assertTrue(launcher.sawCancel, "Progress.isCancelled() must turn true for the work");
        Fx.run(() -> {
            assertTrue(vm.statusProperty().get().contains("cancelled"), vm.statusProperty().get());
            assertEquals("", vm.errorProperty().get());
            assertFalse(vm.runDisabledProperty().get());
            assertEquals(MainViewModel.Mode.CASE, vm.modeProperty().get());
        });
    }

    @Test
    void aBadCaseFileGivesOneShortErrorNamingTheKey() throws Exception {
        Path bad = dir.resolve("bad.json");
        Files.writeString(bad, Files.readString(caseFile).replace("\"laterality\"", "\"lateralty\""));
        Fx.run(() -> vm.open(bad));
        Fx.waitFor("error shown", () -> !vm.errorProperty().get().isEmpty());
        Fx.run(() -> {
            String e = vm.errorProperty().get();
            assertTrue(e.startsWith("Cannot open the case: bad.json"), e);
            assertTrue(e.contains("lateralty"), e);
            assertFalse(e.contains("\n"), "one line");
        });
    }

    @Test
    void withoutAPlannerTheRunActionIsDisabled() {
        MainViewModel none = Fx.call(() -> new MainViewModel(null));
        Fx.run(() -> none.open(caseFile));
        Fx.waitFor("prone image shown", () -> none.viewer().volumeProperty().get() != null);
        Fx.run(() -> {
            assertFalse(none.canPlan());
            assertTrue(none.runDisabledProperty().get());
            none.shutdown();
        });
    }
}
