package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Instant;
import java.util.List;
import java.util.Random;
import java.util.Set;
import org.junit.jupiter.api.Test;

class GraderTest {
    static final RejectBins REJECT = new RejectBins(7, 8, 9, 10, 11, 12, 13);
    static final RetestPolicy RETEST = new RetestPolicy(1, 0);
    static final double F = 1000, W = 2 * Math.PI * F;

    static Recipe cap(GradingMode mode, List<Grade> grades, GuardBand gb, Gates gates) {
        return new Recipe("t-cap", PartType.CAPACITOR, 100e-9, new TestConditions(F, 1, "medium", 1), ModelPolicy.DEFAULT,
                PrimaryParam.CS, mode, grades, gb, gates, null, REJECT, RETEST, ContactCheck.DEFAULT, false);
    }

    static final List<Grade> NESTED = List.of(new Grade("J", 1, -5, 5), new Grade("K", 2, -10, 10), new Grade("M", 3, -20, 20));

    /** A 100 nF-class reading with a given deviation and D. */
    static Reading capReading(double devPct, double d) {
        double c = 100e-9 * (1 + devPct / 100), x = -1 / (W * c);
        return new Reading(F, d * Math.abs(x), x);
    }

    @Test
    void concentricGrades_pickTightestMatchingGrade() {
        Recipe r = cap(GradingMode.CONCENTRIC, NESTED, GuardBand.NONE, Gates.NONE);
        assertEquals("J", Grader.grade(r, capReading(3, 0.01), null, 0).grade());
        assertEquals("K", Grader.grade(r, capReading(-7, 0.01), null, 0).grade());
        assertEquals("M", Grader.grade(r, capReading(15, 0.01), null, 0).grade());
        Grading high = Grader.grade(r, capReading(25, 0.01), null, 0);
        assertEquals("value-high", high.reason().code());
        assertEquals(8, high.bin());
        assertEquals("value-low", Grader.grade(r, capReading(-25, 0.01), null, 0).reason().code());
    }

    @Test
    void ladderGrades_pickTheRangeTheValueFallsIn() {
        List<Grade> seq = List.of(new Grade("A", 1, -20, -5), new Grade("B", 2, -5, 5), new Grade("C", 3, 5, 20));
        Recipe r = cap(GradingMode.LADDER, seq, GuardBand.NONE, Gates.NONE);
        assertEquals("A", Grader.grade(r, capReading(-10, 0.01), null, 0).grade());
        assertEquals("B", Grader.grade(r, capReading(0, 0.01), null, 0).grade());
        assertEquals("C", Grader.grade(r, capReading(19, 0.01), null, 0).grade());
    }

    @Test
    void dGate_rejectsALossyPartWhateverItsValue() {
        Recipe r = cap(GradingMode.CONCENTRIC, NESTED, GuardBand.NONE, new Gates(0.025, null, null, null, null));
        Grading g = Grader.grade(r, capReading(0, 0.04), null, 0);
        assertEquals("d-high", g.reason().code());
        assertEquals(9, g.bin());
        assertEquals(Verdict.FAIL, g.verdict());
    }

    @Test
    void guardBand_rejectsAPartAtTheLimit() {
        // ILAC-G8:09/2019 §4.2.2: guarded acceptance pulls the limit in by w (here w = U, % of the limit value).
        Recipe r = cap(GradingMode.CONCENTRIC, NESTED, new GuardBand(0.5, true), Gates.NONE);
        assertEquals("K", Grader.grade(r, capReading(4.8, 0.01), null, 0).grade(), "inside J's guard band → next grade");
        Grading g = Grader.grade(r, capReading(19.8, 0.01), null, 0);
        assertEquals("guard-band", g.reason().code());
        assertEquals(8, g.bin());
    }

    @Test
    void openContact_neverGetsValueGrade() {
        Recipe r = cap(GradingMode.CONCENTRIC, NESTED, GuardBand.NONE, Gates.NONE);
        double x = -1 / (W * 2e-12); // only the fixture's 2 pF stray
        Grading g = Grader.grade(r, new Reading(F, 0, x), null, 0);
        assertEquals(Verdict.RETEST, g.verdict());
        assertEquals("open-contact", g.reason().code());
        Grading last = Grader.grade(r, new Reading(F, 0, x), null, 1);
        assertEquals(Verdict.FAIL, last.verdict());
        assertEquals(10, last.bin());
    }

    @Test
    void readingEqualToTheOpenCompensation_isAnOpenContact() {
        Recipe r = cap(GradingMode.CONCENTRIC, NESTED, GuardBand.NONE, Gates.NONE);
        Impedance open = new Impedance(F, 100, -79.6e6);
        Compensation c = new Compensation(F, CompensationSource.USER, Instant.EPOCH, open, null, null, null);
        assertEquals("open-contact", Grader.grade(r, Reading.of(open), c, 5).reason().code());
    }

    @Test
    void shortOverloadNonFiniteAndMeterFaults_neverGetValueGrades() {
        Recipe r = cap(GradingMode.CONCENTRIC, NESTED, GuardBand.NONE, Gates.NONE);
        assertEquals("short", Grader.grade(r, new Reading(F, 0.002, -0.001), null, 0).reason().code());
        assertEquals(12, Grader.fault(r, FaultKind.OVERLOAD, 1).bin());
        assertEquals(Verdict.RETEST, Grader.fault(r, FaultKind.OVERLOAD, 0).verdict());
        assertEquals("non-finite", Grader.grade(r, new Reading(F, Double.NaN, -1591), null, 0).reason().code());
        assertEquals("non-finite", Grader.grade(r, new Reading(F, 1, Double.NEGATIVE_INFINITY), null, 0).reason().code());
        assertEquals("frequency-mismatch", Grader.grade(r, new Reading(2 * F, 1, -1591), null, 0).reason().code());
        assertEquals(13, Grader.fault(r, FaultKind.TIMEOUT, 1).bin());
        assertEquals(Verdict.RETEST, Grader.notMeasured(r, Reason.LINE_PAUSED).verdict());
    }

    @Test
    void requiredCompensationMissingOrAtOtherFrequency_isNotGraded() {
        Recipe base = cap(GradingMode.CONCENTRIC, NESTED, GuardBand.NONE, Gates.NONE);
        Recipe r = new Recipe(base.name(), base.partType(), base.nominal(), base.test(), base.model(), base.primary(),
                base.mode(), base.grades(), base.guard(), base.gates(), base.plausible(), base.reject(), base.retest(), base.contact(), true);
        assertEquals("no-compensation", Grader.grade(r, capReading(0, 0.01), null, 0).reason().code());
        Compensation other = new Compensation(2 * F, CompensationSource.USER, Instant.EPOCH, new Impedance(2 * F, 0, -1e8), null, null, null);
        assertEquals("compensation-mismatch", Grader.grade(r, capReading(0, 0.01), other, 0).reason().code());
    }

    @Test
    void everyReading_landsInExactlyOneBinOfThePlan_andUncleanNeverInAValueBin() {
        Recipe r = cap(GradingMode.CONCENTRIC, NESTED, new GuardBand(0.3, true), new Gates(0.03, null, null, null, null));
        Set<Integer> valueBins = Set.of(1, 2, 3);
        Random rnd = new Random(99);
        for (int i = 0; i < 20_000; i++) {
            Reading rd;
            int k = rnd.nextInt(10);
            if (k == 0) rd = new Reading(F, rnd.nextDouble(), -1 / (W * 1e-12 * rnd.nextDouble() * 5));
            else if (k == 1) rd = new Reading(F, Double.NaN, 1);
            else if (k == 2) rd = new Reading(F, Double.POSITIVE_INFINITY, -1591);
            else rd = capReading(rnd.nextGaussian() * 15, Math.abs(rnd.nextGaussian() * 0.02));
            Grading g = Grader.grade(r, rd, null, rnd.nextInt(3));
            boolean clean = k >= 3;
            if (!clean) assertTrue(!valueBins.contains(g.bin()), "unclean reading in value bin: " + g);
            if (valueBins.contains(g.bin())) {
                assertEquals(Verdict.PASS, g.verdict());
                // ILAC-G8 guarded acceptance with U as % of reading: the guard at a limit L is U × L.
                assertTrue(g.devPct() >= -20 + 0.3 * 0.8 - 1e-9 && g.devPct() <= 20 - 0.3 * 1.2 + 1e-9, "dev " + g.devPct());
            } else assertNotEquals(Verdict.PASS, g.verdict());
        }
    }

    @Test
    void guardBand_neverWidensAcceptance() {
        Recipe plain = cap(GradingMode.CONCENTRIC, NESTED, GuardBand.NONE, Gates.NONE);
        Recipe guarded = cap(GradingMode.CONCENTRIC, NESTED, new GuardBand(1, false), Gates.NONE);
        Random rnd = new Random(1);
        for (int i = 0; i < 20_000; i++) {
            Reading rd = capReading(rnd.nextGaussian() * 12, 0.01);
            Grading a = Grader.grade(plain, rd, null, 0), b = Grader.grade(guarded, rd, null, 0);
            if (b.verdict() == Verdict.PASS) {
                assertEquals(Verdict.PASS, a.verdict());
                int ia = NESTED.indexOf(NESTED.stream().filter(x -> x.name().equals(a.grade())).findFirst().orElseThrow());
                int ib = NESTED.indexOf(NESTED.stream().filter(x -> x.name().equals(b.grade())).findFirst().orElseThrow());
                assertTrue(ib >= ia, "guarded grade is never tighter than the plain one");
            }
        }
    }

    @Test
    void recordedReadings_regradeAsTheyWereGradedLive() {
        Recipe r = cap(GradingMode.CONCENTRIC, NESTED, GuardBand.NONE, Gates.NONE);
        Reading live = capReading(3, 0.01);
        Grading first = Grader.grade(r, live, null, 0);
        RecordedReading row = new RecordedReading(2, F, live.rOhm(), live.xOhm(), live.rOhm(), live.xOhm(), first.reason(), 0,
                CompensationSource.NONE, Trigger.Kind.PART);
        assertEquals(first.bin(), Grader.regrade(r, row).bin());
        // A meter timeout on a retest left no reading: its reason and attempt alone give the fault bin.
        RecordedReading timeout = new RecordedReading(3, F, Double.NaN, Double.NaN, Double.NaN, Double.NaN, Reason.METER_TIMEOUT, 1,
                CompensationSource.NONE, Trigger.Kind.PART);
        assertEquals(Grader.fault(r, FaultKind.TIMEOUT, 1).bin(), Grader.regrade(r, timeout).bin());
        assertEquals(13, Grader.regrade(r, timeout).bin());
    }
}
