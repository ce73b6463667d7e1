package org.turnmark.app.gui;

import static com.tngtech.archunit.lang.syntax.ArchRuleDefinition.noClasses;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import com.tngtech.archunit.ArchConfiguration;
import com.tngtech.archunit.core.domain.JavaClasses;
import com.tngtech.archunit.core.importer.ClassFileImporter;
import com.tngtech.archunit.core.importer.ImportOption;

import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import org.turnmark.geom.Grid3;
import org.turnmark.mechanics.mesh.HexMesh;
import org.turnmark.registration.volume.Volume;

/**
 * MVVM layering of the GUI: ViewModels and the plain-Java helpers never touch the scene graph (so
 * they are tested without a window), and nothing outside the GUI and the command line depends on the
 * GUI or on JavaFX.
 */
class GuiArchitectureTest {

    private static JavaClasses classes;

    @BeforeAll
    static void load() throws Exception {
        // Import the compiled main classes of each module directly (scanning every jar on the class
        // path for the package is slow), without resolving library classes: the rules name packages only.
        ArchConfiguration config = ArchConfiguration.get();
        boolean resolve = config.resolveMissingDependenciesFromClassPath();
        config.setResolveMissingDependenciesFromClassPath(false);
        try {
            List<Path> roots = new ArrayList<>();
            for (Class<?> c : new Class<?>[] {MainViewModel.class, Volume.class, HexMesh.class, Grid3.class}) {
                roots.add(Path.of(c.getProtectionDomain().getCodeSource().getLocation().toURI()));
            }
            classes = new ClassFileImporter().withImportOption(ImportOption.Predefined.DO_NOT_INCLUDE_TESTS)
                    .importPaths(roots);
        } finally {
            config.setResolveMissingDependenciesFromClassPath(resolve);
        }
    }

    @Test
    void viewModelsAndPlainHelpersDoNotTouchTheSceneGraph() {
        noClasses().that().resideInAPackage("org.turnmark.app.gui")
                .and().haveSimpleNameEndingWith("ViewModel")
                .or().haveSimpleName("SliceFrame").or().haveSimpleName("SliceRenderer")
                .or().haveSimpleName("EllipseSection").or().haveSimpleName("DisplayWindow")
                .or().haveSimpleName("PlanFolder").or().haveSimpleName("Overlay")
                .or().haveSimpleName("ProgressTask")
                .should().dependOnClassesThat().resideInAnyPackage("javafx.scene..", "javafx.stage..")
                .check(classes);
    }

    @Test
    void onlyTheGuiAndTheCommandLineUseJavaFx() {
        noClasses().that().resideOutsideOfPackages("org.turnmark.app.gui..", "org.turnmark.app.cli..")
                .should().dependOnClassesThat().resideInAnyPackage("javafx..", "org.turnmark.app.gui..")
                .check(classes);
    }
}
