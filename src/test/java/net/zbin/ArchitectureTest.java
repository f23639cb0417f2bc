package net.zbin;

import static com.tngtech.archunit.lang.syntax.ArchRuleDefinition.noClasses;

import com.tngtech.archunit.core.domain.JavaClasses;
import com.tngtech.archunit.core.importer.ClassFileImporter;
import com.tngtech.archunit.core.importer.ImportOption;
import org.junit.jupiter.api.Test;

/** Layering: core ← io ← app, core ← simulators; core does no I/O, threads or logging. */
class ArchitectureTest {
    static final JavaClasses CLASSES = new ClassFileImporter()
            .withImportOption(ImportOption.Predefined.DO_NOT_INCLUDE_TESTS).importPackages("net.zbin");

    @Test
    void core_dependsOnNothingOfOurs_andDoesNoIo() {
        noClasses().that().resideInAPackage("net.zbin.core..")
                .should().dependOnClassesThat().resideInAnyPackage("net.zbin.io..", "net.zbin.app..", "net.zbin.sim..",
                        "java.io..", "java.nio..", "java.net..", "org.slf4j..", "ch.qos.logback..", "com.fazecast..",
                        "org.eclipse.paho..", "com.fasterxml..")
                .check(CLASSES);
        noClasses().that().resideInAPackage("net.zbin.core..").should().dependOnClassesThat()
                .belongToAnyOf(Thread.class, java.util.concurrent.ExecutorService.class).check(CLASSES);
    }

    @Test
    void io_neverReachesIntoApp() {
        noClasses().that().resideInAPackage("net.zbin.io..")
                .should().dependOnClassesThat().resideInAnyPackage("net.zbin.app..", "net.zbin.sim..").check(CLASSES);
    }

    @Test
    void simulators_buildOnCoreOnly() {
        noClasses().that().resideInAPackage("net.zbin.sim..")
                .should().dependOnClassesThat().resideInAnyPackage("net.zbin.app..", "net.zbin.io..").check(CLASSES);
    }
}
