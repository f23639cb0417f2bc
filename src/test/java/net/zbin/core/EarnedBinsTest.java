package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;

/** The ways a part could get a bin it did not earn, each closed. */
class EarnedBinsTest {
    static final RejectBins REJECT = new RejectBins(7, 8, 9, 10, 11, 12, 13);
    static final RetestPolicy RETEST = new RetestPolicy(1, 0);

    static Recipe recipe(PartType type, double nominal, double freqHz, ModelPolicy model, PrimaryParam primary, GradingMode mode,
                         List<Grade> grades, GuardBand gb, Gates gates, FixtureBounds fixture) {
        return new Recipe("t", type, nominal, new TestConditions(freqHz, 1, "medium", 1), model, primary, mode, grades, gb, gates,
                null, REJECT, RETEST, new ContactCheck(10, 0.01, fixture), false);
    }

    static Recipe simple(PartType type, double nominal, double freqHz, FixtureBounds fixture) {
        return recipe(type, nominal, freqHz, ModelPolicy.DEFAULT, null, GradingMode.CONCENTRIC,
                List.of(new Grade("J", 1, -5, 5), new Grade("M", 2, -20, 20)), GuardBand.NONE, Gates.NONE, fixture);
    }

    static Compensation comp(double f, Impedance open, Impedance shortZ) {
        return new Compensation(f, CompensationSource.USER, Instant.EPOCH, open, shortZ, null, null);
    }

    @Test
    void autoModel_isResolvedOncePerRecipe_soNeighbouringPartsStayNeighbours() {
        // Two parts 0.2 % apart in C, either side of |Z| = 100 Ω (common practice: series below ~100 Ω, parallel above ~10 kΩ).
        Recipe r = recipe(PartType.CAPACITOR, 1.5e-6, 1000, ModelPolicy.DEFAULT, null, GradingMode.CONCENTRIC,
                List.of(new Grade("J", 1, -5, 5), new Grade("M", 2, -20, 20)), GuardBand.NONE, Gates.NONE, FixtureBounds.DEFAULT);
        Grading a = Grader.grade(r, new Reading(1000, 19.592, -97.960), null, 0);
        Grading b = Grader.grade(r, new Reading(1000, 19.631, -98.156), null, 0);
        assertEquals(a.model(), b.model());
        assertEquals(EquivalentModel.PARALLEL, a.model(), "nominal reads 106 Ω: mid range, capacitor → parallel");
        assertTrue(Math.abs(a.devPct() - b.devPct()) < 0.5, a.devPct() + " vs " + b.devPct());
        assertEquals("mid-z-capacitor-parallel", r.modelChoice().reason());
    }

    @Test
    void emptyFixture_onASmallCapacitorRecipe_isNeverAPart() {
        // 2.2 pF at 1 MHz reads 72 kΩ: as high as a fixture's own stray (common practice: a few pF of lead stray).
        Recipe r = simple(PartType.CAPACITOR, 2.2e-12, 1e6, FixtureBounds.DEFAULT);
        assertTrue(r.needsOpenCompensation());
        Reading emptyFixture = new Reading(1e6, 2.6418, -72343);
        Grading g = Grader.grade(r, emptyFixture, null, 0);
        assertEquals("no-compensation", g.reason().code());
        assertNotEquals(Verdict.PASS, g.verdict());
        // With the open stored, the same reading is the fixture: open contact.
        Compensation c = comp(1e6, new Impedance(1e6, 2.6418, -72343), new Impedance(1e6, 0.01, 0.02));
        assertEquals("open-contact", Grader.grade(r, emptyFixture, c, 0).reason().code());
        // A reading within open_check_f of the stored open is still the fixture.
        double y = 2 * Math.PI * 1e6 * (2.2e-12 + 0.3e-12);
        assertEquals("open-contact", Grader.grade(r, new Reading(1e6, 0, -1 / y), c, 0).reason().code());
    }

    @Test
    void bareShortBar_onALowOhmResistorRecipe_isNeverAPart() {
        Recipe r = simple(PartType.RESISTOR, 0.025, 1000, FixtureBounds.DEFAULT);
        assertTrue(r.needsShortCompensation());
        assertTrue(r.unreachable() != null, "on the default fixture a 25 mΩ part is within the short's band");
        Reading bar = new Reading(1000, 0.025, 0.0005);
        assertEquals("no-compensation", Grader.grade(r, bar, null, 0).reason().code());
        Compensation c = comp(1000, new Impedance(1000, 0, -1e9), new Impedance(1000, 0.025, 0.0005));
        assertEquals("short", Grader.grade(r, bar, c, 0).reason().code());
        assertEquals(Verdict.FAIL, Grader.grade(r, bar, c, 1).verdict());
    }

    @Test
    void implausibleLoss_isRejectedForItsPhase_notCalledOpen() {
        // 1000 µF with 20 mΩ ESR at 100 kHz: D ≈ 12.6, on a fixture that resolves 1 mΩ (Kelvin contacts).
        FixtureBounds kelvin = new FixtureBounds(20e-12, 1e-6, 2, 0.5e-12, 0.001, 0.001);
        Recipe big = simple(PartType.CAPACITOR, 1000e-6, 100e3, kelvin);
        double x = -1 / (2 * Math.PI * 100e3 * 1000e-6);
        Compensation c = comp(100e3, new Impedance(100e3, 0, -1e6), new Impedance(100e3, 0, 0));
        Grading g = Grader.grade(big, new Reading(100e3, 0.020, x), c, 0);
        assertEquals("phase-implausible", g.reason().code());
        assertEquals(9, g.bin());
        // 10 µH with 1 Ω winding resistance at 1 kHz: D ≈ 16.
        Recipe ind = simple(PartType.INDUCTOR, 10e-6, 1000, FixtureBounds.DEFAULT);
        double xl = 2 * Math.PI * 1000 * 10e-6;
        Compensation c2 = comp(1000, new Impedance(1000, 0, -1e9), new Impedance(1000, 0, 0));
        assertEquals("phase-implausible", Grader.grade(ind, new Reading(1000, 1.0, xl), c2, 0).reason().code());
    }

    @Test
    void leakyCapacitor_withoutGates_isNotGradedOnItsCapacitance() {
        // 100 nF in parallel with 200 Ω at 1 kHz: D = G/B ≈ 8 (parallel RC: D = G/B = 1/(ωRC), Hayt, Kemmerly & Durbin, Engineering Circuit Analysis, from memory).
        Recipe r = simple(PartType.CAPACITOR, 100e-9, 1000, FixtureBounds.DEFAULT);
        double g = 1 / 200.0, b = 2 * Math.PI * 1000 * 100e-9, y2 = g * g + b * b;
        Impedance z = new Impedance(1000, g / y2, -b / y2);
        Grading leaky = Grader.grade(r, Reading.of(z), null, 0);
        assertEquals("phase-implausible", leaky.reason().code());
        assertEquals(Verdict.FAIL, leaky.verdict());
        // A recipe may widen the window explicitly, and then the part is graded on its Cp.
        Recipe wide = new Recipe("t", PartType.CAPACITOR, 100e-9, r.test(), r.model(), PrimaryParam.CP, r.mode(), r.grades(),
                r.guard(), r.gates(), new PhaseWindow(-90, -5), REJECT, RETEST, r.contact(), false);
        assertEquals("J", Grader.grade(wide, Reading.of(z), null, 0).grade());
    }

    @Test
    void dAndQGates_agree_andAResistanceJustBelowZeroIsNotALoss() {
        Recipe dGate = recipe(PartType.CAPACITOR, 100e-9, 1000, ModelPolicy.DEFAULT, PrimaryParam.CS, GradingMode.CONCENTRIC,
                List.of(new Grade("J", 1, -5, 5)), GuardBand.NONE, new Gates(0.001, null, null, null, null), FixtureBounds.DEFAULT);
        Recipe qGate = recipe(PartType.CAPACITOR, 100e-9, 1000, ModelPolicy.DEFAULT, PrimaryParam.CS, GradingMode.CONCENTRIC,
                List.of(new Grade("J", 1, -5, 5)), GuardBand.NONE, new Gates(null, 1000.0, null, null, null), FixtureBounds.DEFAULT);
        double x = -1 / (2 * Math.PI * 1000 * 100e-9);
        for (double r : new double[] {-0.001, -0.0, 0.0, 0.001, 1.0, 1.6, 2.0}) {
            Reading rd = new Reading(1000, r, x);
            Grading a = Grader.grade(dGate, rd, null, 0), b = Grader.grade(qGate, rd, null, 0);
            assertEquals(a.verdict(), b.verdict(), "R = " + r + ": d_max 0.001 and q_min 1000 are one limit");
        }
        // −0 and 0 are one reading.
        assertEquals(Grader.grade(dGate, new Reading(1000, -0.0, x), null, 0), Grader.grade(dGate, new Reading(1000, 0.0, x), null, 0));
        // R below −d_resolution·|Z| is stale compensation: retest, then the fault bin, never a value bin.
        Reading negative = new Reading(1000, -5, x);
        Grading first = Grader.grade(dGate, negative, null, 0), last = Grader.grade(dGate, negative, null, 1);
        assertEquals("negative-r", first.reason().code());
        assertEquals(Verdict.RETEST, first.verdict());
        assertEquals(13, last.bin());
        assertTrue(Double.isNaN(last.d()) && Double.isNaN(last.value()));
    }

    @Test
    void guardBand_isTheUncertaintyAtTheLimitValue_forEveryLimitForm() {
        // ILAC-G8:09/2019 with U stated as % of reading (JCGM 106:2012): guard at a limit L is U × L.
        GuardBand u1 = new GuardBand(1, true);
        Grade z = new Grade("Z", 1, -20, 80); // IEC 60062 Z: −20/+80 %
        assertEquals(-20 + 0.8, z.acceptLowPct(u1), 1e-12);
        assertEquals(80 - 1.8, z.acceptHighPct(u1), 1e-12);
        Grade j = new Grade("J", 1, -5, 5);
        assertEquals(5 - 1.05, j.acceptHighPct(u1), 1e-12);
        assertEquals(-5 + 0.95, j.acceptLowPct(u1), 1e-12);
        // Absolute limits (IEC 60062 C below 10 pF: ±0.25 pF): on 4.7 pF the upper limit 4.95 pF is guarded by 1 % of 4.95 pF.
        double[] c = ToleranceCode.C.limitsPct(PartType.CAPACITOR, 4.7e-12);
        Grade small = new Grade("C", 1, c[0], c[1]);
        double upper = 4.7e-12 * (1 + small.acceptHighPct(u1) / 100);
        assertEquals(4.95e-12 * 0.99, upper, 1e-24);
    }

    @Test
    void ladder_guardsItsInnerEdges_andAnUnguardedEdgeGoesUp() {
        List<Grade> ladder = List.of(new Grade("A", 1, -20, -7), new Grade("B", 2, -7, 7), new Grade("C", 3, 7, 20));
        Recipe plain = recipe(PartType.RESISTOR, 1000, 1000, ModelPolicy.DEFAULT, PrimaryParam.RS, GradingMode.LADDER, ladder,
                GuardBand.NONE, Gates.NONE, FixtureBounds.DEFAULT);
        Recipe guarded = recipe(PartType.RESISTOR, 1000, 1000, ModelPolicy.DEFAULT, PrimaryParam.RS, GradingMode.LADDER, ladder,
                new GuardBand(0.5, true), Gates.NONE, FixtureBounds.DEFAULT);
        assertEquals("B", Grader.grade(plain, new Reading(1000, 930, 0), null, 0).grade(), "edge value goes to the upper range");
        assertEquals("C", Grader.grade(plain, new Reading(1000, 1070, 0), null, 0).grade());
        assertEquals("A", Grader.grade(plain, new Reading(1000, 800, 0), null, 0).grade(), "outer edges are closed");
        assertEquals("C", Grader.grade(plain, new Reading(1000, 1200, 0), null, 0).grade());
        Grading inner = Grader.grade(guarded, new Reading(1000, 931, 0), null, 0);
        assertEquals("guard-band", inner.reason().code(), "−6.9 % is within 0.5 % of the −7 % edge");
        assertEquals(7, inner.bin(), "below nominal: the low bin");
        assertEquals("guard-band", Grader.grade(guarded, new Reading(1000, 1069, 0), null, 0).reason().code());
        assertEquals(8, Grader.grade(guarded, new Reading(1000, 1069, 0), null, 0).bin());
        assertEquals("B", Grader.grade(guarded, new Reading(1000, 1000, 0), null, 0).grade());
    }

    @Test
    void faultDecisions_carryNoLossFigures() {
        Recipe r = simple(PartType.CAPACITOR, 100e-9, 1000, FixtureBounds.DEFAULT);
        Grading open = Grader.grade(r, new Reading(1000, 3e4, -8e7), null, 0);
        assertEquals("open-contact", open.reason().code());
        for (double v : new double[] {open.d(), open.q(), open.esrOhm(), open.thetaDeg(), open.value(), open.devPct()})
            assertTrue(Double.isNaN(v), open.toString());
        assertTrue(Double.isFinite(open.rOhm()), "R and X stay for diagnosis");
        Grading good = Grader.grade(r, new Reading(1000, 1, -1591.5), null, 0);
        assertFalse(Double.isNaN(good.d()));
    }

    @Test
    void pureResistance_hasInfiniteD_andALosslessReactanceInfiniteQ() {
        Impedance r = new Impedance(1000, 100, 0);
        assertEquals(Double.POSITIVE_INFINITY, r.d());
        assertEquals(0, r.q());
        Impedance c = new Impedance(1000, 0, -1000);
        assertEquals(Double.POSITIVE_INFINITY, c.q());
        assertEquals(Double.POSITIVE_INFINITY, c.rpOhm());
        assertEquals(new Impedance(1000, -0.0, -1000), c, "−0 is 0");
    }

    @Test
    void recipeWhoseNominalReadsLikeTheCompensatedFixture_saysNoPartCanPass() {
        assertTrue(simple(PartType.CAPACITOR, 1000e-6, 100e3, FixtureBounds.DEFAULT).unreachable().contains("short"));
        assertTrue(simple(PartType.CAPACITOR, 0.1e-12, 1e6, FixtureBounds.DEFAULT).unreachable().contains("empty fixture"));
        assertEquals(null, simple(PartType.CAPACITOR, 100e-9, 1e3, FixtureBounds.DEFAULT).unreachable());
    }
}
