package net.zbin.app.report;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import org.junit.jupiter.api.Test;

/** Plot ticks are round numbers (1, 2 or 5 × 10ⁿ steps), with 0 and a round nominal among them when in range. */
class SvgTicksTest {
    @Test
    void ticks_areRound_andHoldZero() {
        assertArrayEquals(new double[] {0, 0.2, 0.4, 0.6, 0.8, 1.0}, Svg.ticks(0, 1), 1e-12);
        double[] t = Svg.ticks(-0.37, 1.13);
        assertTrue(Arrays.stream(t).anyMatch(v -> v == 0), Arrays.toString(t));
        for (double v : t) assertTrue(Math.abs(v * 5 - Math.rint(v * 5)) < 1e-9, "a multiple of 0.2: " + Arrays.toString(t));
    }

    @Test
    void ticks_ofANominalSweep_includeTheNominal() {
        double[] t = Svg.ticks(4.5e-12, 5.2e-12);
        assertTrue(Arrays.stream(t).anyMatch(v -> Math.abs(v - 4.7e-12) < 1e-24), Arrays.toString(t));
        assertTrue(t.length >= 4 && t.length <= 10, Arrays.toString(t));
    }
}
