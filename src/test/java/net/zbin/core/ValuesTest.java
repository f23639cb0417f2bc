package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class ValuesTest {
    private static void rel(double expected, double actual) { assertEquals(expected, actual, Math.abs(expected) * 1e-12); }

    private static double si(String text, Unit u) { return SiValue.parse(text, u); }

    @Test
    void siPrefixes_withOrWithoutTheirOwnUnit() {
        rel(100e-9, si("100n", Unit.FARAD));
        rel(100e-9, si("100nF", Unit.FARAD));
        rel(4.7e-6, si("4.7u", Unit.HENRY));
        rel(4.7e-6, si("4.7µH", Unit.HENRY));
        rel(1e3, si("1k", Unit.HERTZ));
        rel(1e5, si("100kHz", Unit.HERTZ));
        rel(2.2e-12, si("2.2p", Unit.FARAD));
        rel(10e3, si("10kohm", Unit.OHM));
        rel(1e-3, si("1m", Unit.OHM));
        rel(1e6, si("1M", Unit.OHM));
        rel(1e-9, si("1e-9", Unit.FARAD));
        rel(-88.4, si("-88.4", Unit.DEGREE));
        rel(100, si("100F", Unit.FARAD)); // F is the unit; femto is f
        rel(100e-15, si("100f", Unit.FARAD));
        rel(5, si("5%", Unit.PERCENT));
    }

    @Test
    void plainNumbers_arePlainValues_neverCodes() {
        // A number means what it says: 1000 on a resistance is 1000 Ω, not a marking code.
        assertEquals(1000, si("1000", Unit.OHM));
        assertEquals(4990, si("4990", Unit.OHM));
        assertEquals(100, si("100", Unit.OHM));
        assertEquals(1000, si("1e3", Unit.OHM));
        assertEquals(4990, si("4.99k", Unit.OHM));
        assertEquals(104, si("104", Unit.FARAD));
    }

    @Test
    void aWrittenUnit_mustFitTheQuantity() {
        var e = assertThrows(IllegalArgumentException.class, () -> si("1kHz", Unit.OHM));
        assertTrue(e.getMessage().contains("frequency") && e.getMessage().contains("resistance"), e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> si("100kOhm", Unit.HERTZ));
        assertThrows(IllegalArgumentException.class, () -> si("10uF", Unit.HENRY));
        assertThrows(IllegalArgumentException.class, () -> si("4R7", Unit.HENRY), "R belongs to resistance");
        assertThrows(IllegalArgumentException.class, () -> si("4K7", Unit.FARAD), "K belongs to resistance");
        assertThrows(IllegalArgumentException.class, () -> si("5k", Unit.PERCENT), "a percentage takes no prefix");
        assertThrows(IllegalArgumentException.class, () -> si("25m", Unit.RATIO), "a ratio takes no prefix");
        var an = assertThrows(IllegalArgumentException.class, () -> si("10uF", Unit.HENRY));
        assertTrue(an.getMessage().contains("an inductance"), an.getMessage());
    }

    @Test
    void rkmCodes_perIec60062() {
        // IEC 60062 RKM code: R47 = 0.47 Ω, 4R7 = 4.7 Ω, 4K7 = 4.7 kΩ; 4p7, 2n2.
        rel(0.47, si("R47", Unit.OHM));
        rel(4.7, si("4R7", Unit.OHM));
        rel(4.7e3, si("4K7", Unit.OHM));
        rel(4.7e-12, si("4p7", Unit.FARAD));
        rel(2.2e-9, si("2n2", Unit.FARAD));
        rel(1.5e6, si("1M5", Unit.OHM));
        rel(4.7e-6, si("4u7", Unit.HENRY));
    }

    @Test
    void decimalText_parsesExactly_andMinusSignsAreMinus() {
        assertEquals(2.2e-12, si("2p2", Unit.FARAD)); // not 2.2000000000000003e-12
        assertEquals(2.2e-12, si("2.2p", Unit.FARAD));
        assertEquals(4.7e-6, si("4u7", Unit.HENRY));
        assertEquals(0.1e-6, si("0.1u", Unit.FARAD));
        assertEquals(-5.0, si("\u22125", Unit.DEGREE)); // Unicode minus sign
        assertEquals(-4.7, si("-4R7", Unit.OHM));
        assertEquals(-4.7, si("\u22124R7", Unit.OHM));
        assertEquals(0.0, si("-0", Unit.OHM));
        assertEquals(Double.doubleToLongBits(0.0), Double.doubleToLongBits(si("-0", Unit.OHM)), "no negative zero");
    }

    @Test
    void garbage_isRejectedNamingTheText() {
        var e = assertThrows(IllegalArgumentException.class, () -> si("10 bananas", Unit.OHM));
        assertTrue(e.getMessage().contains("'10 bananas'"));
        assertThrows(IllegalArgumentException.class, () -> si("", Unit.OHM));
        assertThrows(IllegalArgumentException.class, () -> si("k", Unit.OHM));
    }

    @Test
    void markingCodes_capacitorsInPicofarads_inductorsInMicrohenries_resistorsInOhms() {
        // IEC 60062 marking codes: 104 = 100 nF, 223 = 22 nF, 479 = 4.7 pF; 472 = 4.7 kΩ, 1002 = 10 kΩ, 4992 = 49.9 kΩ.
        assertEquals(100e-9, MarkingCode.parse("104", PartType.CAPACITOR));
        assertEquals(22e-9, MarkingCode.parse("223", PartType.CAPACITOR));
        assertEquals(4.7e-12, MarkingCode.parse("479", PartType.CAPACITOR));
        assertEquals(4.7e-12, MarkingCode.parse("4R7", PartType.CAPACITOR));
        assertEquals(4.7e3, MarkingCode.parse("472", PartType.RESISTOR));
        assertEquals(10e3, MarkingCode.parse("1002", PartType.RESISTOR));
        assertEquals(49.9e3, MarkingCode.parse("4992", PartType.RESISTOR));
        assertEquals(4990, MarkingCode.parse("4991", PartType.RESISTOR));
        assertEquals(4.7, MarkingCode.parse("4R7", PartType.RESISTOR));
        assertEquals(0.47, MarkingCode.parse("R47", PartType.RESISTOR));
        assertEquals(4.7e3, MarkingCode.parse("4K7", PartType.RESISTOR));
        // Common practice for inductors (codes in µH, R as decimal point, N for nH): 101 = 100 µH, 4R7 = 4.7 µH, 4N7 = 4.7 nH.
        assertEquals(100e-6, MarkingCode.parse("101", PartType.INDUCTOR));
        assertEquals(4.7e-6, MarkingCode.parse("4R7", PartType.INDUCTOR));
        assertEquals(0.47e-6, MarkingCode.parse("R47", PartType.INDUCTOR));
        assertEquals(4.7e-9, MarkingCode.parse("4N7", PartType.INDUCTOR));
        assertThrows(IllegalArgumentException.class, () -> MarkingCode.parse("1042", PartType.CAPACITOR));
        assertThrows(IllegalArgumentException.class, () -> MarkingCode.parse("4K7", PartType.CAPACITOR));
        assertThrows(IllegalArgumentException.class, () -> MarkingCode.parse("107", PartType.RESISTOR));
        var e = assertThrows(IllegalArgumentException.class, () -> MarkingCode.parse("4N7", PartType.RESISTOR));
        assertTrue(e.getMessage().contains("a resistor marking code") && e.getMessage().contains("in Ω"), e.getMessage());
    }

    @Test
    void toleranceLetters_percentAndAbsoluteBelow10pF() {
        // IEC 60062 tolerance letters: B 0.1, C 0.25, D 0.5, F 1, G 2, J 5, K 10, M 20 %, Z −20/+80 %;
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
    }

    @Test
    void toleranceLetters_theRestOfTheTable_includingAsymmetric() {
        // IEC 60062:2016, the letter code for tolerances (from memory, as the standard's table lists them):
        // L ±0.01 %, P ±0.02 %, W ±0.05 %, N ±30 %; asymmetric Q −10/+30 %, T −10/+50 %, S −20/+50 %.
        assertArrayEquals(new double[] {-0.01, 0.01}, ToleranceCode.parse("L").limitsPct(PartType.RESISTOR, 1e3));
        assertArrayEquals(new double[] {-0.02, 0.02}, ToleranceCode.parse("P").limitsPct(PartType.RESISTOR, 1e3));
        assertArrayEquals(new double[] {-0.05, 0.05}, ToleranceCode.parse("W").limitsPct(PartType.RESISTOR, 1e3));
        assertArrayEquals(new double[] {-30, 30}, ToleranceCode.parse("N").limitsPct(PartType.CAPACITOR, 1e-6));
        assertArrayEquals(new double[] {-10, 30}, ToleranceCode.parse("Q").limitsPct(PartType.CAPACITOR, 1e-6));
        assertArrayEquals(new double[] {-10, 50}, ToleranceCode.parse("T").limitsPct(PartType.CAPACITOR, 1e-6));
        assertArrayEquals(new double[] {-20, 50}, ToleranceCode.parse("s").limitsPct(PartType.CAPACITOR, 1e-6));
        var e = assertThrows(IllegalArgumentException.class, () -> ToleranceCode.parse("X"));
        assertTrue(e.getMessage().contains("Q T S Z"), e.getMessage());
    }

    @Test
    void eSeries_historicalListsAndRoundedFormula() {
        // IEC 60063 preferred number series: E6 = 1.0 1.5 2.2 3.3 4.7 6.8; E12 adds 1.2 1.8 2.7 3.9 5.6 8.2.
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
