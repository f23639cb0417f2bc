package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;

/** A polymer capacitor's plan (invented values): C and D at 120 Hz, then ESR at 100 kHz. */
class MultiStepTest {
    static final double F1 = 120, F2 = 100e3, C = 100e-6;
    static final TestStep ESR = new TestStep("esr", new TestConditions(F2, 0.5, "medium", 1), new Gates(null, null, 0.025, null, null));

    /**
     * A fixture for milliohm ESR: a compensated reading is a short only within 1 mΩ of the stored short (the default
     * 50 mΩ would call a 19 mΩ part at 100 kHz a short — a line that tests ESR sets {@code fixture.short_check_ohm}).
     */
    static final ContactCheck LOW_Z = new ContactCheck(10, 0.01, new FixtureBounds(20e-12, 1e-6, 2, 0.5e-12, 0.001, 0.001));

    static Recipe recipe() {
        return new Recipe("poly-100u", PartType.CAPACITOR, C, new TestConditions(F1, 0.5, "medium", 1), ModelPolicy.DEFAULT, PrimaryParam.CS,
                GradingMode.CONCENTRIC, List.of(new Grade("M", 1, -20, 20)), GuardBand.NONE, new Gates(0.1, null, null, null, null), null,
                GraderTest.REJECT, GraderTest.RETEST, LOW_Z, false).toBuilder().steps(List.of(ESR)).build();
    }

    /** Open and short at both frequencies: a fixture of 1 pF stray and 2 mΩ + 5 nH residual (invented). */
    static Compensation comp(double f) {
        return new Compensation(f, CompensationSource.USER, Instant.EPOCH, Compensation.openFromAdmittance(f, 1e-12, 0),
                new Impedance(f, 0.002, 2 * Math.PI * f * 5e-9), null, null);
    }

    /** What the meter reads of a capacitor of value c with ESR esr and 2 nH ESL through that fixture (raw). */
    static Reading read(double f, double c, double esr) {
        double w = 2 * Math.PI * f;
        Impedance part = new Impedance(f, esr, w * 2e-9 - 1 / (w * c));
        Impedance shorted = new Impedance(f, 0.002, w * 5e-9);
        // series residual, then the stray across it: Zm = 1 / (1/(Zs + Zx) + jωC0)
        double zr = part.rOhm() + shorted.rOhm(), zx = part.xOhm() + shorted.xOhm();
        double d = zr * zr + zx * zx, yr = zr / d, yx = -zx / d + w * 1e-12;
        double e = yr * yr + yx * yx;
        return new Reading(f, yr / e, -yx / e);
    }

    static PartSession session(Recipe r) {
        return new PartSession(PartSession.plan(r), FixtureCheck.Limits.DEFAULT, Trigger.Kind.PART, comp(F1), MultiStepTest::comp, 0);
    }

    @Test
    void aGoodPart_isReadAtEachStepsConditions_andGetsTheValueStepsGrade() {
        PartSession s = session(recipe());
        assertEquals(F1, s.conditions().freqHz());
        assertNull(s.offer(read(F1, C * 1.05, 0.012), true), "the value passed: on to the ESR step");
        assertEquals(F2, s.conditions().freqHz(), "the meter is set to the step's conditions");
        Grading g = s.offer(read(F2, C * 1.05, 0.012), true);
        assertNotNull(g);
        assertEquals("M", g.grade());
        assertEquals(1, g.steps().size());
        assertEquals("esr", g.steps().get(0).step());
        assertEquals(0.012, g.steps().get(0).measured().z().rOhm(), 1e-6, "the step's reading, compensated at its own frequency");
    }

    @Test
    void aLaterStep_canOnlyReject_intoTheGateBinWithItsReason() {
        PartSession s = session(recipe());
        assertNull(s.offer(read(F1, C, 0.040), true));
        Grading g = s.offer(read(F2, C, 0.040), true);
        assertEquals("esr-high", g.reason().code());
        assertEquals(GraderTest.REJECT.gate(), g.bin());
        assertEquals(0.0, g.devPct(), 1e-3, "the value read at the value step stays beside the reject (the 2 nH ESL moves Cs by 1e-5 %)");
    }

    @Test
    void aPartTheValueStepRejects_isNotReadAgain() {
        Grading g = session(recipe()).offer(read(F1, C * 1.3, 0.012), true);
        assertNotNull(g, "decided at once");
        assertEquals("value-high", g.reason().code());
        assertTrue(g.steps().isEmpty());
    }

    @Test
    void aStepReadingThatIsNotClean_goesThroughTheRetestPolicy_withNoValue() {
        PartSession s = session(recipe());
        assertNull(s.offer(read(F1, C, 0.012), true));
        Grading g = s.offer(new Reading(F2, Double.NaN, Double.NaN), true);
        assertEquals(Verdict.RETEST, g.verdict());
        assertEquals("non-finite", g.reason().code());
        assertEquals(Double.NaN, g.devPct());
    }

    @Test
    void aReplayedRow_isJudgedByTheSameSteps_andARowWithoutTheStepCannotPass() {
        Recipe r = recipe();
        PartSession s = session(r);
        s.offer(read(F1, C, 0.040), true);
        Grading live = s.offer(read(F2, C, 0.040), true);
        RecordedReading row = new RecordedReading(2, F1, live.rOhm(), live.xOhm(), live.rawROhm(), live.rawXOhm(), null, 0, CompensationSource.USER,
                Trigger.Kind.PART, 7, "P7", "L", 1, live.steps());
        assertEquals(live.outcome(), Grader.recorded(r, row).outcome(), "replay = live");
        RecordedReading without = new RecordedReading(3, F1, live.rOhm(), live.xOhm(), live.rawROhm(), live.rawXOhm(), null, 0,
                CompensationSource.USER, Trigger.Kind.PART, 8, "P8", "L", 1, List.of());
        assertEquals("step-not-measured", Grader.recorded(r, without).reason().code());
    }

    @Test
    void stepsAreChecked() {
        assertThrows(SpecException.class, () -> new TestStep("esr", new TestConditions(F2, 0.5, "medium", 1), Gates.NONE), "a step without gates");
        assertThrows(SpecException.class, () -> new TestStep("value", new TestConditions(F2, 0.5, "medium", 1), ESR.gates()));
        assertThrows(SpecException.class, () -> recipe().toBuilder().steps(List.of(ESR, ESR)).build(), "a step named twice");
    }

    @Test
    void aPlanIsCompensatedOnlyWhenEveryStepsFrequencyIs_andItsAgeIsTheOldest() {
        Recipe r = recipe().toBuilder().compensationRequired(true).build();
        LineMonitor m = new LineMonitor(r.monitor(), FixtureCheck.Limits.DEFAULT, r);
        Instant now = Instant.parse("2026-12-02T12:00:00Z");
        Compensation at120 = new Compensation(F1, CompensationSource.USER, now.minusSeconds(3600), comp(F1).open(), comp(F1).shortZ(), null, null);
        List<AlarmCode.Change> c = m.compensation(at120, java.util.Arrays.asList((Compensation) null), true, now);
        assertTrue(c.stream().anyMatch(x -> x.code() == AlarmCode.COMPENSATION_MISSING && x.active() && x.message().contains("100.0 kHz")),
                "the ESR step's frequency has none: " + c);
        Compensation old100k = new Compensation(F2, CompensationSource.USER, now.minusSeconds(20 * 3600), comp(F2).open(), comp(F2).shortZ(), null, null);
        c = m.compensation(at120, List.of(old100k), true, now);
        assertTrue(c.stream().anyMatch(x -> x.code() == AlarmCode.COMPENSATION_MISSING && !x.active()), c.toString());
        assertTrue(c.stream().anyMatch(x -> x.code() == AlarmCode.COMPENSATION_OLD && x.active() && x.message().contains("20.0 h")),
                "the plan's compensation is as old as its oldest step's: " + c);
    }
}
