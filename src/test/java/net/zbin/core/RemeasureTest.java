package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.List;
import org.junit.jupiter.api.Test;

class RemeasureTest {
    /** J/K/M, U = 0.3 % of which 0.25 % repeatability, up to 3 readings within 0.5 points of a limit. */
    static Recipe recipe() {
        return GraderTest.cap(GradingMode.CONCENTRIC, GraderTest.NESTED, new GuardBand(0.3, true, 0.25), Gates.NONE).toBuilder()
                .remeasure(new Remeasure(3, 0.5)).build();
    }

    static PartSession session(Recipe r, Trigger.Kind kind) {
        return new PartSession(PartSession.plan(r), FixtureCheck.Limits.DEFAULT, kind, null, 0);
    }

    @Test
    void uncertaintyOfAMean_shrinksOnlyItsRepeatabilityPart() {
        // JCGM 100:2008 (GUM) 4.2.3: a mean of n observations has s/√n; 5.1.2: uncorrelated parts add in quadrature.
        GuardBand g = new GuardBand(0.3, true, 0.2);
        assertEquals(0.3, g.uncertaintyPct(1), 1e-15);
        assertEquals(Math.sqrt(0.09 - 0.04 + 0.04 / 4), g.uncertaintyPct(4), 1e-15); // 0.2449…
        assertEquals(Math.sqrt(0.05), g.uncertaintyPct(1_000_000), 1e-6, "the systematic part stays");
        assertEquals(0.3, new GuardBand(0.3, true).uncertaintyPct(9), 0, "no repeatability part stated: nothing shrinks");
        assertThrows(SpecException.class, () -> new GuardBand(0.3, true, 0.4), "the repeatability part cannot exceed U");
        assertThrows(SpecException.class, () -> new GuardBand(0.3, false, 0.1), "a plain guard width has no uncertainty to split");
    }

    @Test
    void aPartFarFromEveryLimit_isDecidedOnItsFirstReading() {
        Grading g = session(recipe(), Trigger.Kind.PART).offer(GraderTest.capReading(1.0, 0.01), true);
        assertNotNull(g);
        assertEquals("J", g.grade());
        assertEquals(1, g.readings());
    }

    @Test
    void aPartInTheGuardZone_isMeasuredAgain_andDecidedOnTheMeanWithTheMeansGuard() {
        Recipe r = recipe();
        PartSession s = session(r, Trigger.Kind.PART);
        // J accepts up to 5 − 0.3 × 1.05 = 4.685 % with one reading: 4.80 % is in J's guard zone
        assertEquals("K", Grader.grade(r, GraderTest.capReading(4.80, 0.01), null, 0).grade(), "one reading alone: not J");
        assertNull(s.offer(GraderTest.capReading(4.80, 0.01), true), "near a limit: another reading");
        assertNull(s.offer(GraderTest.capReading(4.50, 0.01), true), "the mean 4.65 % is still near: a third");
        Grading g = s.offer(GraderTest.capReading(4.40, 0.01), true);
        assertNotNull(g, "three readings at most");
        assertEquals(3, g.readings());
        // the mean 4.567 % against J's limit guarded by U(3) = √(0.09 − 0.0625 + 0.0625/3) = 0.2199 %: 5 − 0.231 = 4.769 %
        assertEquals("J", g.grade());
        assertEquals(4.5667, g.devPct(), 1e-3);
    }

    @Test
    void noTimeLeftBeforeTheDeadline_decidesOnWhatWasRead() {
        Grading g = session(recipe(), Trigger.Kind.PART).offer(GraderTest.capReading(4.80, 0.01), false);
        assertNotNull(g);
        assertEquals(1, g.readings());
        assertEquals("K", g.grade());
    }

    @Test
    void anUncleanReadingDuringReMeasurement_endsThePart_withNoValue() {
        PartSession s = session(recipe(), Trigger.Kind.PART);
        assertNull(s.offer(GraderTest.capReading(4.80, 0.01), true));
        double x = -1 / (GraderTest.W * 2e-12); // the contact lifted: only the fixture's stray
        Grading g = s.offer(new Reading(GraderTest.F, 0, x), true);
        assertEquals("open-contact", g.reason().code());
        assertEquals(Verdict.RETEST, g.verdict());
        assertEquals(Double.NaN, g.devPct(), "never averaged into a value");
    }

    @Test
    void fixtureChecks_areNeverReMeasured() {
        Recipe r = recipe();
        Grading g = session(r, Trigger.Kind.OPEN).offer(new Reading(GraderTest.F, 0, -1 / (GraderTest.W * 2e-12)), true);
        assertNotNull(g);
    }

    @Test
    void aReplayedMean_isJudgedWithTheGuardOfItsReadings() {
        Recipe r = recipe();
        LineEngine e = LineEngine.of(r);
        Reading mean = GraderTest.capReading(4.75, 0.01);
        RecordedReading one = new RecordedReading(2, GraderTest.F, mean.rOhm(), mean.xOhm(), Double.NaN, Double.NaN, null, 0,
                CompensationSource.NONE, Trigger.Kind.PART, 1, "P1", "L1", 1, List.of());
        RecordedReading three = new RecordedReading(3, GraderTest.F, mean.rOhm(), mean.xOhm(), Double.NaN, Double.NaN, null, 0,
                CompensationSource.NONE, Trigger.Kind.PART, 2, "P2", "L1", 3, List.of());
        assertEquals("K", e.regrade(one).grading().grade(), "one reading at 4.75 %: beyond J's 4.685 %");
        assertEquals("J", e.regrade(three).grading().grade(), "a mean of three at 4.75 %: within J's 4.769 %");
        assertEquals(3, e.regrade(three).grading().readings());
    }

    @Test
    void remeasureSettings_areChecked() {
        assertThrows(SpecException.class, () -> new Remeasure(0, 0.5));
        assertThrows(SpecException.class, () -> new Remeasure(3, 0), "re-measuring needs a band");
        assertEquals(false, Remeasure.OFF.on());
    }
}
