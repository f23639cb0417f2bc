package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code check} adds up each recipe's plan with the meter profile's stated timing, against the handler's deadline. */
class PlanDeadlineTest {
    @TempDir
    Path dir;

    @Test
    void aPlanThatFits_isShownWithItsTime() throws Exception {
        Path cfg = TestLine.write(dir, "fits", "tcp://127.0.0.1:1883", 5025, "");
        Cli c = Cli.run("check", "--config", cfg.toString());
        assertEquals(0, c.exit(), c.err() + c.out());
        // the simulator's profile: medium 10 ms a reading, 5 ms a change of conditions — 10 + (5 + 10) + 5 for the polymer plan
        assertTrue(c.out().contains("plan: up to 30.00 ms at the meter, inside the 150 ms deadline"), c.out());
    }

    @Test
    void aPlanLongerThanTheDeadline_isRefusedNamingTheRecipeAndItsTime() throws Exception {
        Path cfg = TestLine.write(dir, "slow", "tcp://127.0.0.1:1883", 5025, "handler: {deadline_ms: 25}\n");
        java.nio.file.Files.writeString(cfg, java.nio.file.Files.readString(cfg).replace("active: mlcc-x7r-100n", "active: polymer-cap-100u-esr"));
        Cli c = Cli.run("check", "--config", cfg.toString());
        assertEquals(2, c.exit(), c.out());
        assertTrue(c.err().contains("polymer-cap-100u-esr: its plan takes up to 30.00 ms") && c.err().contains("deadline of 25 ms"), c.err());
        // a recipe the line does not run now is a warning: the line could be switched to it
        assertTrue(c.out().contains("warning: mlcc-x7r-100n-remeasure: its plan takes up to 30.00 ms"), "3 readings at 10 ms: " + c.out());
    }

    @Test
    void aShippedRecipeSlowerThanTheDefaultDeadline_isNamed() throws Exception {
        // resistor-prec-4k99 reads slow with averaging 4: 4 × 40 ms at the simulator, past a 150 ms deadline
        Path cfg = TestLine.write(dir, "res", "tcp://127.0.0.1:1883", 5025, "");
        Cli c = Cli.run("check", "--config", cfg.toString());
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().contains("warning: resistor-prec-4k99: its plan takes up to 160.0 ms"), c.out());
    }
}
