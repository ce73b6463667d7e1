package org.turnmark.app;

import static com.tngtech.archunit.lang.syntax.ArchRuleDefinition.noClasses;

import com.tngtech.archunit.core.importer.ImportOption;
import com.tngtech.archunit.junit.AnalyzeClasses;
import com.tngtech.archunit.junit.ArchTest;
import com.tngtech.archunit.lang.ArchRule;

/**
 * Layering rules (house style): the numerical modules know nothing of the application, the GUI,
 * the command line or JSON; the pipeline, uncertainty and export code never reach into the GUI or
 * the command line; only the command line writes to the standard streams.
 */
@AnalyzeClasses(packages = "org.turnmark", importOptions = ImportOption.DoNotIncludeTests.class)
class ArchitectureTest {

    @ArchTest
    static final ArchRule NUMERICAL_MODULES_STAY_PLAIN = noClasses()
            .that().resideInAnyPackage("org.turnmark.registration..", "org.turnmark.mechanics..", "org.turnmark.geom..")
            .should().dependOnClassesThat().resideInAnyPackage("org.turnmark.app..", "javafx..", "picocli..",
                    "com.fasterxml.jackson..", "org.slf4j..", "ch.qos.logback..", "org.apache.logging..");

    @ArchTest
    static final ArchRule PIPELINE_NEVER_IMPORTS_GUI_OR_CLI = noClasses()
            .that().resideInAnyPackage("org.turnmark.app.pipeline..", "org.turnmark.app.uncertainty..",
                    "org.turnmark.app.export..")
            .should().dependOnClassesThat().resideInAnyPackage("org.turnmark.app.gui..", "org.turnmark.app.cli..",
                    "javafx..", "picocli..");

    @ArchTest
    static final ArchRule ONLY_THE_COMMAND_LINE_USES_STANDARD_STREAMS = noClasses()
            .that().resideOutsideOfPackage("org.turnmark.app.cli..")
            .should().accessField(System.class, "out")
            .orShould().accessField(System.class, "err");
}
