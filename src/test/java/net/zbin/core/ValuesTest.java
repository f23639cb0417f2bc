package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class ValuesTest {
    private static void rel(double expected, double actual) { assertEquals(expected, actual, Math.abs(expected) * 1e-12); }

    @Test
    void siPrefixes_withOrWithoutUnits() {
        rel(100e-9, SiValue.parse("100n"));
        rel(100e-9, SiValue.parse("100nF"));
        rel(4.7e-6, SiValue.parse("4.7u"));
        rel(4.7e-6, SiValue.parse("4.7µH"));
        rel(1e3, SiValue.parse("1k"));
        rel(2.2e-12, SiValue.parse("2.2p"));
        rel(10e3, SiValue.parse("10kohm"));
        rel(1e-3, SiValue.parse("1m"));
        rel(1e6, SiValue.parse("1M"));
        rel(1e-9, SiValue.parse("1e-9"));
        rel(-88.4, SiValue.parse("-88.4"));
        rel(100, SiValue.parse("100F"));
    }

    @Test
    void rkmCodes_perIec60062() {
        // IEC 60062 RKM code (REFERENCES.md): R47 = 0.47 Ω, 4R7 = 4.7 Ω, 4K7 = 4.7 kΩ; 4p7, 2n2.
        rel(0.47, SiValue.parse("R47"));
        rel(4.7, SiValue.parse("4R7"));
        rel(4.7e3, SiValue.parse("4K7"));
        rel(4.7e-12, SiValue.parse("4p7"));
        rel(2.2e-9, SiValue.parse("2n2"));
        rel(2.2e-12, SiValue.parse("2p2"));
        rel(1.5e6, SiValue.parse("1M5"));
    }

    @Test
    void garbage_isRejectedNamingTheText() {
        var e = assertThrows(IllegalArgumentException.class, () -> SiValue.parse("10 bananas"));
        assertTrue(e.getMessage().contains("'10 bananas'"));
        assertThrows(IllegalArgumentException.class, () -> SiValue.parse(""));
        assertThrows(IllegalArgumentException.class, () -> SiValue.parse("k"));
    }

    @Test
    void markingCodes_capacitorsInPicofarads_resistorsInOhms() {
        // IEC 60062 (REFERENCES.md): 104 = 100 nF, 223 = 22 nF, 479 = 4.7 pF; 472 = 4.7 kΩ, 1002 = 10 kΩ, 4992 = 49.9 kΩ.
        rel(100e-9, MarkingCode.parse("104", PartType.CAPACITOR));
        rel(22e-9, MarkingCode.parse("223", PartType.CAPACITOR));
        assertEquals(4.7e-12, MarkingCode.parse("479", PartType.CAPACITOR), 1e-24);
        rel(4.7e3, MarkingCode.parse("472", PartType.RESISTOR));
        rel(10e3, MarkingCode.parse("1002", PartType.RESISTOR));
        rel(49.9e3, MarkingCode.parse("4992", PartType.RESISTOR));
        assertThrows(IllegalArgumentException.class, () -> MarkingCode.parse("1042", PartType.CAPACITOR));
        assertThrows(IllegalArgumentException.class, () -> MarkingCode.parse("104", PartType.INDUCTOR));
    }

    @Test
    void toleranceLetters_percentAndAbsoluteBelow10pF() {
        // IEC 60062 (REFERENCES.md): B 0.1, C 0.25, D 0.5, F 1, G 2, J 5, K 10, M 20 %, Z −20/+80 %;
        // below 10 pF B/C/D/F/G are ±0.1/0.25/0.5/1/2 pF.
        assertArrayEquals(new double[] {-5, 5}, ToleranceCode.J.limitsPct(PartType.CAPACITOR, 100e-9));
        assertArrayEquals(new double[] {-10, 10}, ToleranceCode.K.limitsPct(PartType.RESISTOR, 1e3));
        assertArrayEquals(new double[] {-20, 80}, ToleranceCode.Z.limitsPct(PartType.CAPACITOR, 1e-6));
        assertArrayEquals(new double[] {-0.1, 0.1}, ToleranceCode.B.limitsPct(PartType.CAPACITOR, 1e-6));
        double[] c = ToleranceCode.C.limitsPct(PartType.CAPACITOR, 4.7e-12); // ±0.25 pF of 4.7 pF
        assertEquals(-0.25 / 4.7 * 100, c[0], 1e-9);
        assertEquals(0.25 / 4.7 * 100, c[1], 1e-9);
        double[] d = ToleranceCode.D.limitsPct(PartType.RESISTOR, 4.7); // a 4.7 Ω resistor stays in percent
        assertArrayEquals(new double[] {-0.5, 0.5}, d);
        assertThrows(IllegalArgumentException.class, () -> ToleranceCode.parse("Q"));
    }

    @Test
    void eSeries_historicalListsAndRoundedFormula() {
        // IEC 60063 (REFERENCES.md): E6 = 1.0 1.5 2.2 3.3 4.7 6.8; E12 adds 1.2 1.8 2.7 3.9 5.6 8.2.
        assertArrayEquals(new double[] {1.0, 1.5, 2.2, 3.3, 4.7, 6.8}, ESeries.E6.mantissas());
        assertArrayEquals(new double[] {1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2}, ESeries.E12.mantissas());
        // E24 adds 1.1 1.3 1.6 2.0 2.4 3.0 3.6 4.3 5.1 6.2 7.5 9.1 (historical, not the formula: 10^(10/24) → 2.6, not 2.7).
        assertTrue(ESeries.E24.contains(2.7) && ESeries.E24.contains(9.1) && ESeries.E24.contains(3.0));
        // E96 by formula: 10^(i/96) to 3 figures, e.g. 4.99 (4991 resistor) and 1.02.
        assertTrue(ESeries.E96.contains(4.99e3));
        assertTrue(ESeries.E96.contains(102));
        // E192 index 185 is 9.20 by the standard, though the formula rounds to 9.19.
        assertEquals(9.20, ESeries.E192.mantissas()[185], 1e-12);
        assertFalse(ESeries.E12.contains(4.99e3));
        rel(4.7e3, ESeries.E12.nearest(4.6e3));
        rel(10e-9, ESeries.E6.nearest(9.6e-9));
        assertEquals(192, ESeries.E192.size());
        assertEquals(ESeries.E96, ESeries.parse("e96"));
        assertThrows(IllegalArgumentException.class, () -> ESeries.parse("E7"));
    }

    @Test
    void numbersForPeople_carryPrefixAndUnit() {
        assertEquals("100.0 nF", SiValue.format(100e-9, "F"));
        assertEquals("4.990 kΩ", SiValue.format(4990, "ohm"));
        assertEquals("0 Ω", SiValue.format(0, "ohm"));
        assertEquals("∞ Ω", SiValue.format(Double.POSITIVE_INFINITY, "ohm"));
        assertEquals("-159.2 mH", SiValue.format(-0.1592, "H"));
    }
}
