package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class WilsonTest {
    @Test
    void eightyOneOf263_matchesNewcombeTableI() {
        // Newcombe 1998, Statistics in Medicine 17:857–872, Table I (Wilson score, method 3): 81/263 → 0.2553–0.3662.
        double[] ci = Wilson.interval(81, 263, Wilson.Z95);
        assertEquals(0.2553, ci[0], 0.00005);
        assertEquals(0.3662, ci[1], 0.00005);
    }

    @Test
    void allOrNothing_staysInsideZeroToOne_andEmptyIsNaN() {
        double[] all = Wilson.interval(50, 50, Wilson.Z95);
        assertEquals(1.0, all[1], 1e-12);
        assertTrue(all[0] > 0.9 && all[0] < 1);
        assertEquals(0.0, Wilson.interval(0, 50, Wilson.Z95)[0], 1e-12);
        assertTrue(Double.isNaN(Wilson.interval(0, 0, Wilson.Z95)[0]));
    }
}
