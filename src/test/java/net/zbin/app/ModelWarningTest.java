package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A lossy part graded by a model chosen from |Z| alone: Cp = Cs/(1 + D²) (series/parallel equivalents, Hayt, Kemmerly &
 * Durbin, Engineering Circuit Analysis, from memory), so at D 0.15 the two differ by 2.25 % and {@code check} says so.
 */
class ModelWarningTest {
    @TempDir
    Path dir;

    static final String ELECTROLYTIC = """
            recipe: alu-10u
            part: capacitor
            nominal: 10u
            test: {freq: 120, level_v: 0.5, speed: medium, averaging: 1}
            model: {mode: auto}
            %s
            grading: concentric
            grades:
              - {name: M, bin: 1, tolerance: M}
            gates: {d_max: 0.15}
            reject: {low: 7, high: 8, gate: 9, contact: 10, short: 10, overload: 11, fault: 11}
            retest: {count: 1, bin: 0}
            """;

    Cli check(String primary) throws Exception {
        Path p = dir.resolve("r.yaml");
        Files.writeString(p, String.format(ELECTROLYTIC, primary));
        return Cli.run("check", "--recipe", p.toString());
    }

    @Test
    void anElectrolyticGradedByAModelFromItsImpedance_isWarnedAbout() throws Exception {
        // 10 µF at 120 Hz reads 133 Ω: the mid range, where the |Z| rule picks the parallel model for capacitors.
        Cli c = check("");
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().contains("warning: model: Cp is graded") && c.out().contains("2.25 %") && c.out().contains("Cs = Cp(1 + D²)"), c.out());
    }

    @Test
    void naming_theFamilysModel_silencesIt() throws Exception {
        Cli c = check("primary: Cs");
        assertEquals(0, c.exit(), c.err());
        assertFalse(c.out().contains("warning: model"), c.out());
    }

    @Test
    void theShippedRecipes_needNoModelWarning() {
        for (String r : new String[] {"mlcc-c0g-100p", "mlcc-c0g-47p", "mlcc-c0g-4p7", "mlcc-x7r-100n", "inductor-pwr-4u7", "resistor-prec-4k99"}) {
            Cli c = Cli.run("check", "--recipe", "config/recipes/" + r + ".yaml");
            assertEquals(0, c.exit(), c.err());
            assertFalse(c.out().contains("warning"), r + ":\n" + c.out());
        }
    }
}
