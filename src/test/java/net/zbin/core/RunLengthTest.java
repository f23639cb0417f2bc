package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/** The Markov-chain run lengths against the published tables, and the budgeted design against its own promise. */
class RunLengthTest {
    @Test
    void normalCdf_agreesWithCommonsMath_toNineDigitsIntoTheTails() {
        for (double x = -30; x <= 8; x += 0.0173) {
            double p = RunLength.phi(x), q = 0.5 * org.apache.commons.math3.special.Erf.erfc(-x / Math.sqrt(2));
            double rel = x <= 0 ? Math.abs(p / q - 1) : Math.abs((1 - p) - (1 - q)) / Math.max(1 - q, 1e-16);
            assertTrue(rel < 1e-8, "Φ(" + x + "): " + p + " vs " + q);
        }
    }

    @Test
    void cusumChain_matchesLucasAndCrosier() {
        // Lucas & Crosier 1982, Technometrics 24, Table 1 (two-sided, k = 0.5, zero start):
        // h = 4: ARL 168 in control, 26.6 at 0.5σ, 8.38 at 1σ, 3.34 at 2σ; h = 5: 465, 38.0, 10.4, 4.01.
        double[][] table = {{4, 0, 168}, {4, 0.5, 26.6}, {4, 1, 8.38}, {4, 2, 3.34}, {5, 0, 465}, {5, 0.5, 38.0}, {5, 1, 10.4}, {5, 2, 4.01}};
        for (double[] row : table)
            assertEquals(row[2], RunLength.cusum(0.5, row[0], row[1]), row[2] * 0.006, "h " + row[0] + " shift " + row[1]);
    }

    @Test
    void ewmaChain_matchesLucasAndSaccucci() {
        // Lucas & Saccucci 1990, Technometrics 32 (asymptotic limits): λ 0.10, L 2.814: ARL 500, 31.3 (0.5σ), 10.3 (1σ), 4.4 (2σ);
        // λ 0.20, L 2.962: 500, 41.8, 10.5, 3.7.
        double[][] table = {{0.10, 2.814, 0, 500}, {0.10, 2.814, 0.5, 31.3}, {0.10, 2.814, 1, 10.3}, {0.10, 2.814, 2, 4.4},
                {0.20, 2.962, 0, 500}, {0.20, 2.962, 0.5, 41.8}, {0.20, 2.962, 1, 10.5}, {0.20, 2.962, 2, 3.7}};
        for (double[] row : table)
            assertEquals(row[3], RunLength.ewma(row[0], row[1], row[2]), row[3] * 0.012, "λ " + row[0] + " shift " + row[2]);
    }

    @Test
    void design_meetsItsBudget_andTightensWithTheRate() {
        MonitorSettings d = MonitorSettings.DEFAULT;
        ChartDesign at30 = d.design();
        // P points a shift per quantity; four charts share the budget.
        double p = 30 * 3600 * 8 / 25.0;
        assertEquals(p, at30.pointsPerShift(), 1e-9);
        assertEquals(1.0, at30.falseAlarmsPerShift(), 0.01, "the design spends the budget");
        assertTrue(at30.cusumArl0() > 4 * p && at30.ewmaArl0() > 4 * p, "each chart's known-baseline ARL is above 4 P: " + at30);
        assertEquals(Math.sqrt(25) / 3 / 2, at30.k(), 1e-12, "k is half the shift to catch, in σ of a point");
        MonitorSettings slower = new MonitorSettings(d.learnParts(), d.subgroup(), 1, 8, 10, 1.0 / 3, Double.NaN, Double.NaN, Double.NaN, Double.NaN,
                d.clearAfter(), d.windowParts(), d.maxNegativeRPct(), d.compMaxAgeH(), Double.NaN, Double.NaN);
        assertTrue(slower.design().h() < at30.h() && slower.design().limitL() < at30.limitL(), "a slower line can afford tighter limits");
        MonitorSettings shortLearn = new MonitorSettings(2_000, d.subgroup(), 1, 8, 30, 1.0 / 3, Double.NaN, Double.NaN, Double.NaN, Double.NaN,
                d.clearAfter(), d.windowParts(), d.maxNegativeRPct(), d.compMaxAgeH(), Double.NaN, Double.NaN);
        assertTrue(shortLearn.design().h() > at30.h(), "a baseline learned from fewer parts needs wider limits");
    }

    @Test
    void statedLimits_areKept_andTheirCostIsShown() {
        MonitorSettings d = MonitorSettings.DEFAULT;
        MonitorSettings old = new MonitorSettings(2_000, 25, 1, 8, 30, 1.0 / 3, 0.10, 2.814, 0.5, 5, d.clearAfter(), d.windowParts(),
                d.maxNegativeRPct(), d.compMaxAgeH(), Double.NaN, Double.NaN);
        ChartDesign c = old.design();
        assertEquals(5, c.h(), 0);
        assertEquals(2.814, c.limitL(), 0);
        assertTrue(!c.designedH() && !c.designedL());
        assertTrue(c.falseAlarmsPerShift() > 100, "ARL-500 charts at 30 parts/s raise hundreds of alarms a shift: " + c.falseAlarmsPerShift());
    }
    @Test
    void limitsSolvedBefore_areTakenOnlyWhereTheyMeetTheBudget() {
        // settings no other test designs (the designs are remembered per process)
        MonitorSettings s = MonitorSettings.DEFAULT.toBuilder().falseAlarmsPerShift(0.61).build();
        MonitorSettings other = MonitorSettings.DEFAULT.toBuilder().falseAlarmsPerShift(0.62).build();
        ChartDesign solved = ChartDesign.designed(s);
        assertTrue(!ChartDesign.known(s), "solving afresh does not remember");
        assertEquals(null, ChartDesign.adopt(other, solved.h(), solved.limitL()), "another setting's limits miss this budget");
        assertEquals(null, ChartDesign.adopt(s, solved.h() * 0.97, solved.limitL()), "an h 3 % low spends more than the budget");
        assertEquals(null, ChartDesign.adopt(s, solved.h(), solved.limitL() * 1.03), "an L 3 % high spends less than the budget");
        assertEquals(null, ChartDesign.adopt(s, Double.NaN, solved.limitL()));
        assertTrue(!ChartDesign.known(s), "nothing refused is remembered");
        assertEquals(solved, ChartDesign.adopt(s, solved.h(), solved.limitL()), "the solve's own limits give the solve's design");
        assertTrue(ChartDesign.known(s));
        assertEquals(solved, s.design());
    }
}
