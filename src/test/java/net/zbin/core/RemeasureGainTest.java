package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;

class RemeasureGainTest {
    /** J/K/M around 100 nF, U 0.3 % of which 0.25 % repeatability, re-read within 0.3 points of a limit. */
    static Recipe recipe(double repeatabilityPct) {
        return GraderTest.cap(GradingMode.CONCENTRIC, GraderTest.NESTED, new GuardBand(0.3, true, repeatabilityPct), Gates.NONE).toBuilder()
                .remeasure(repeatabilityPct > 0 ? new Remeasure(3, 0.3) : Remeasure.OFF).build();
    }

    @Test
    void oneReading_agreesWithTheJcgm106RiskOfTheSameLot() {
        // JCGM 106:2012 §9.5 (normal process, normal measurement): tune's false-accept figure for a lot drawn from
        // N(1 %, 4.5 %) read with U = 0.3 % must match the simulation's single-reading figure within its sampling error.
        Recipe r = recipe(0.25);
        Random rnd = new Random(5);
        int n = 200_000;
        double[] devs = new double[n];
        for (int i = 0; i < n; i++) devs[i] = 1 + 4.5 * rnd.nextGaussian() + 0.15 * rnd.nextGaussian();
        double[] sorted = devs.clone();
        Arrays.sort(sorted);
        double[] risk = Tuner.risk(r, new double[][] {sorted, devs}, 0.3);
        RiskModel process = RiskModel.fromLot(devs, n, 0.3);
        RemeasureGain one = RemeasureGain.estimate(r, process, 0.3, 1, 7).get(0);
        double analyticFa = 100 * risk[0] / n;
        double mcSigma = 100 * Math.sqrt(analyticFa / 100 / RemeasureGain.PARTS); // binomial sampling error, % of parts
        System.out.printf("false accept %%: JCGM 106 %.4f, simulated %.4f (± %.4f)%n", analyticFa, one.falseAcceptPct(), mcSigma);
        assertEquals(analyticFa, one.falseAcceptPct(), 4 * mcSigma + 0.002);
        assertEquals(1.0, one.meanReadings(), 0);
    }

    @Test
    void reReadingNearALimit_keepsGoodPartsInTheirGrade_andAcceptsNoMoreWrongly() {
        RiskModel process = new RiskModel(1, 4.5, 0.15, true, 10_000);
        List<RemeasureGain> g = RemeasureGain.estimate(recipe(0.25), process, 0.3, 3, 11);
        System.out.println(g);
        assertTrue(g.get(2).downgradedPct() < g.get(0).downgradedPct() * 0.85, "fewer parts below the grade they earn: " + g);
        assertTrue(g.get(2).falseAcceptPct() <= g.get(0).falseAcceptPct(), "at no more false-accept risk: " + g);
        assertTrue(g.get(2).meanReadings() > 1 && g.get(2).meanReadings() < 1.5, "only parts near a limit are read again: " + g);
    }

    @Test
    void withoutARepeatabilityPart_moreReadingsChangeNothing() {
        // the same systematic error in every reading: their mean is the first reading, and U of the mean is U
        RiskModel process = new RiskModel(1, 4.5, 0.15, true, 10_000);
        List<RemeasureGain> g = RemeasureGain.estimate(recipe(0), process, 0.3, 3, 11);
        assertEquals(g.get(0).falseAcceptPct(), g.get(2).falseAcceptPct(), 0);
        assertEquals(g.get(0).downgradedPct(), g.get(2).downgradedPct(), 0);
    }
}
