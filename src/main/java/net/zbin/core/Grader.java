package net.zbin.core;

import java.util.Optional;

/**
 * Turns a raw reading into a grading under a recipe. Fail-safe: any reading that is not clean
 * (non-finite, wrong frequency, missing or mismatched compensation, open contact, short, R below zero
 * beyond the compensation's resolution) — and any meter failure, see {@link #fault} — is retested up to
 * the recipe's count and then rejected; it never reaches a value grade.
 */
public final class Grader {
    private Grader() {}

    /**
     * @param comp    compensation for the recipe frequency, or null if none is loaded
     * @param attempt 0 for the first presentation of the part, 1 for its first retest, …
     */
    public static Grading grade(Recipe recipe, Reading reading, Compensation comp, int attempt) {
        double f = reading.freqHz();
        if (!reading.isFinite()) return unclean(recipe, attempt, Reason.NON_FINITE, Grading.Measurement.of(reading, null, CompensationSource.NONE));
        if (!Compensation.matches(f, recipe.freqHz()))
            return unclean(recipe, attempt, Reason.FREQUENCY_MISMATCH, Grading.Measurement.of(reading, null, CompensationSource.NONE));
        Impedance raw = new Impedance(f, reading.rOhm(), reading.xOhm());
        CompensationSource source = comp == null || !comp.isApplied() ? CompensationSource.NONE : comp.source();
        if (source == CompensationSource.NONE) return gradeCorrected(recipe, raw, reading, source, attempt, false, false);
        if (!Compensation.matches(comp.freqHz(), f))
            return unclean(recipe, attempt, Reason.COMPENSATION_MISMATCH, Grading.Measurement.of(reading, null, source));
        Optional<Impedance> corrected = comp.correct(raw);
        if (corrected.isEmpty()) return unclean(recipe, attempt, Reason.OPEN_CONTACT, Grading.Measurement.of(reading, null, source));
        return gradeCorrected(recipe, corrected.get(), reading, source, attempt, comp.open() != null, comp.shortZ() != null);
    }

    /**
     * Grades an impedance that is already compensated (a record-log row being replayed, or the
     * tail of {@link #grade}). {@code raw} keeps the reading as the meter gave it.
     */
    public static Grading gradeCorrected(Recipe recipe, Impedance z, Reading raw, CompensationSource source, int attempt) {
        return gradeCorrected(recipe, z, raw, source, attempt, source != CompensationSource.NONE, source != CompensationSource.NONE);
    }

    /**
     * As above, saying which sides of the compensation were applied, so that an open or a short is
     * judged against the stored fixture where there is one and against any uncompensated fixture where
     * there is none.
     */
    public static Grading gradeCorrected(Recipe recipe, Impedance z, Reading raw, CompensationSource source, int attempt,
                                         boolean openCompensated, boolean shortCompensated) {
        Grading.Measurement m = Grading.Measurement.of(raw, z, source);
        if (!Compensation.matches(z.freqHz(), recipe.freqHz()))
            return unclean(recipe, attempt, Reason.FREQUENCY_MISMATCH, Grading.Measurement.of(raw, null, source));
        boolean missing = source == CompensationSource.NONE && recipe.compensationRequired()
                || !openCompensated && recipe.needsOpenCompensation() // asked only for a side not applied: a few divisions a reading
                || !shortCompensated && recipe.needsShortCompensation();
        if (missing) return unclean(recipe, attempt, Reason.NO_COMPENSATION, Grading.Measurement.of(raw, null, source));
        double ideal = recipe.idealZOhm();
        ContactCheck contact = recipe.contact();
        if (contact.isOpen(recipe.partType(), ideal, z, openCompensated)) return unclean(recipe, attempt, Reason.OPEN_CONTACT, m);
        if (contact.isShort(ideal, z, shortCompensated)) return unclean(recipe, attempt, Reason.SHORT, m);
        if (contact.fixture().negativeBeyondResolution(z)) return unclean(recipe, attempt, Reason.NEGATIVE_R, m);

        PrimaryParam param = recipe.primaryParam();
        double value = z.value(param);
        double dev = (value - recipe.nominal()) * 100 / recipe.nominal(); // exact at decimal edges: 930 of 1000 is −7 %
        Grading.Value v = new Grading.Value(recipe.equivalentModel(), param, value, dev);
        if (!(value > 0) || !Double.isFinite(value)) return rejected(recipe, Reason.WRONG_SIGN, false, m, v);
        if (!recipe.plausible().admits(z)) return rejected(recipe, Reason.PHASE_IMPLAUSIBLE, false, m, v);
        Reason gate = recipe.gates().firstFailure(z);
        if (gate != null) return rejected(recipe, gate, false, m, v);
        return byValue(recipe, m, v);
    }

    /**
     * Judges a reading of a later step of the plan: null when it is clean and meets the step's gates, else the
     * decision — the retest policy's for a reading that is not clean, the gate bin for a gate it fails. The reading
     * itself is returned as the step's measurement through {@code out} (compensated at the step's frequency).
     *
     * @param comp the compensation at the step's frequency (null: none)
     */
    public static Grading step(Recipe recipe, TestStep step, Reading reading, Compensation comp, int attempt, Grading.StepReading[] out) {
        double f = reading.freqHz();
        out[0] = new Grading.StepReading(step.name(), Grading.Measurement.of(reading, null, CompensationSource.NONE));
        if (!reading.isFinite()) return unclean(recipe, attempt, Reason.NON_FINITE, null);
        if (!Compensation.matches(f, step.test().freqHz())) return unclean(recipe, attempt, Reason.FREQUENCY_MISMATCH, null);
        Impedance raw = new Impedance(f, reading.rOhm(), reading.xOhm());
        CompensationSource source = comp == null || !comp.isApplied() ? CompensationSource.NONE : comp.source();
        Impedance z = raw;
        boolean openComp = false, shortComp = false;
        if (source != CompensationSource.NONE) {
            if (!Compensation.matches(comp.freqHz(), f)) return unclean(recipe, attempt, Reason.COMPENSATION_MISMATCH, null);
            Optional<Impedance> c = comp.correct(raw);
            if (c.isEmpty()) return unclean(recipe, attempt, Reason.OPEN_CONTACT, null);
            z = c.get();
            openComp = comp.open() != null;
            shortComp = comp.shortZ() != null;
        } else if (recipe.compensationRequired()) return unclean(recipe, attempt, Reason.NO_COMPENSATION, null);
        out[0] = new Grading.StepReading(step.name(), Grading.Measurement.of(reading, z, source));
        return stepCorrected(recipe, step, z, attempt, openComp, shortComp);
    }

    /**
     * The same for a step reading already compensated (a record-log row replayed): null when it passes. Contacts are
     * judged against the part's ideal |Z| at the step's frequency.
     */
    public static Grading stepCorrected(Recipe recipe, TestStep step, Impedance z, int attempt, boolean openCompensated, boolean shortCompensated) {
        double ideal = recipe.partType().idealZOhm(recipe.nominal(), step.test().freqHz());
        ContactCheck contact = recipe.contact();
        if (contact.isOpen(recipe.partType(), ideal, z, openCompensated)) return unclean(recipe, attempt, Reason.OPEN_CONTACT, null);
        if (contact.isShort(ideal, z, shortCompensated)) return unclean(recipe, attempt, Reason.SHORT, null);
        if (contact.fixture().negativeBeyondResolution(z)) return unclean(recipe, attempt, Reason.NEGATIVE_R, null);
        Reason gate = step.gates().firstFailure(z);
        if (gate == null) return null;
        return new Grading(rejected(recipe, gate, false), null, null);
    }

    /**
     * Grades a recorded reading again, as it was graded live: compensated R/X are graded as they
     * stand, and a row without R/X (nothing was measured, e.g. a meter timeout or overload) is
     * re-created from its reason.
     */
    public static Grading regrade(Recipe recipe, RecordedReading row) {
        boolean hasZ = Double.isFinite(row.rOhm()) && Double.isFinite(row.xOhm());
        if (!hasZ && row.reason() != null) return byReason(recipe, row.reason(), row.attempt());
        if (!hasZ) return grade(recipe, new Reading(row.freqHz(), row.rOhm(), row.xOhm()), null, row.attempt());
        Impedance z = new Impedance(row.freqHz(), row.rOhm(), row.xOhm());
        double rawR = Double.isFinite(row.rawROhm()) ? row.rawROhm() : row.rOhm();
        double rawX = Double.isFinite(row.rawXOhm()) ? row.rawXOhm() : row.xOhm();
        return gradeCorrected(recipe, z, new Reading(row.freqHz(), rawR, rawX), row.comp(), row.attempt());
    }

    /**
     * A recorded row of any kind as the line graded it: parts regraded ({@link #regrade}); an open or short
     * check as its recorded residual and outcome; a reference presentation regraded, with its recorded
     * check outcome.
     */
    public static Grading recorded(Recipe recipe, RecordedReading row) {
        Trigger.Kind kind = row.kind();
        if (kind == Trigger.Kind.PART) return recipe.steps().isEmpty() ? regrade(recipe, row) : laterSteps(recipe, regrade(recipe, row), row);
        Reason reason = row.reason() == null ? Reason.FIXTURE_OK : row.reason();
        boolean ok = reason == Reason.FIXTURE_OK || reason == Reason.REFERENCE_OK;
        Grading.Outcome o = new Grading.Outcome(recipe.retest().bin(), kind.key() + "-check", ok ? Verdict.PASS : Verdict.FAIL, reason);
        if (kind == Trigger.Kind.REFERENCE) {
            Grading g = regrade(recipe, new RecordedReading(row.line(), row.freqHz(), row.rOhm(), row.xOhm(), row.rawROhm(), row.rawXOhm(),
                    null, 0, row.comp(), Trigger.Kind.PART));
            return new Grading(new Grading.Outcome(o.bin(), "reference", o.verdict(), o.reason()), g.measured(), g.graded());
        }
        boolean hasZ = Double.isFinite(row.rOhm()) && Double.isFinite(row.xOhm()) && row.freqHz() > 0;
        Impedance z = hasZ ? new Impedance(row.freqHz(), row.rOhm(), row.xOhm()) : null;
        return new Grading(o, new Grading.Measurement(row.freqHz(), z, row.rawROhm(), row.rawXOhm(), row.comp()), null);
    }

    /**
     * The plan's later steps of a recorded part, judged as the line judged them: only a part the value step passes
     * is judged further; a step the row has no reading of cannot pass ({@code step-not-measured}); a step reading that
     * was not clean gives the row's recorded reason, as it did live.
     */
    private static Grading laterSteps(Recipe r, Grading g, RecordedReading row) {
        if (g.verdict() != Verdict.PASS) return g.withSteps(row.steps());
        for (TestStep st : r.steps()) {
            Grading.StepReading rd = null;
            for (Grading.StepReading x : row.steps()) if (x.step().equals(st.name())) rd = x;
            if (rd == null) return new Grading(notMeasured(r, Reason.STEP_NOT_MEASURED).outcome(), g.measured(), null, row.steps());
            Grading.Measurement m = rd.measured();
            Grading fail;
            if (m.z() == null) fail = row.reason() != null && row.reason().kind() == Reason.Kind.UNCLEAN
                    ? unclean(r, row.attempt(), row.reason(), null) : unclean(r, row.attempt(), Reason.NON_FINITE, null);
            else if (m.comp() == CompensationSource.NONE && r.compensationRequired()) fail = unclean(r, row.attempt(), Reason.NO_COMPENSATION, null);
            else fail = stepCorrected(r, st, m.z(), row.attempt(), m.comp() != CompensationSource.NONE, m.comp() != CompensationSource.NONE);
            if (fail != null) return new Grading(fail.outcome(), g.measured(),
                    fail.reason().rejectClass() == Reason.RejectClass.GATE && fail.verdict() == Verdict.FAIL ? g.graded() : null, row.steps());
        }
        return g.withSteps(row.steps());
    }

    /**
     * Re-creates the grading of a reading that was not clean, from its reason alone (replay of a record whose
     * reading is missing). A value reason without a value is not clean: a fault.
     */
    public static Grading byReason(Recipe recipe, Reason reason, int attempt) {
        return switch (reason.kind()) {
            case NOT_MEASURED -> notMeasured(recipe, reason);
            case UNCLEAN -> unclean(recipe, attempt, reason, null);
            default -> unclean(recipe, attempt, Reason.METER_ERROR, null); // a value reason without a value: not clean
        };
    }

    private static Grading byValue(Recipe r, Grading.Measurement m, Grading.Value v) {
        return new Grading(byValue(r, v.devPct()), m, v);
    }

    /**
     * The by-value rule: the outcome of a clean reading, within the gates, that deviates {@code devPct} % from nominal.
     * The one statement of it: {@link ValueBands} cuts it into bands for {@code tune}'s counting.
     */
    public static Grading.Outcome byValue(Recipe r, double devPct) {
        GuardBand gb = r.guard();
        double dev = devPct;
        var grades = r.grades();
        Grade first = grades.get(0), last = grades.get(grades.size() - 1);
        if (r.mode() == GradingMode.CONCENTRIC) {
            for (Grade g : grades) if (g.accepts(dev, gb)) return passed(g);
            if (dev < last.lowPct() || dev > last.highPct()) return rejected(r, dev < last.lowPct() ? Reason.VALUE_LOW : Reason.VALUE_HIGH, false);
            return rejected(r, Reason.GUARD_BAND, dev < (last.lowPct() + last.highPct()) / 2);
        }
        if (dev < first.lowPct() || dev > last.highPct()) return rejected(r, dev < first.lowPct() ? Reason.VALUE_LOW : Reason.VALUE_HIGH, false);
        // Adjacent ranges, every edge guarded; at an unguarded inner edge the upper range takes the part.
        for (int i = grades.size() - 1; i >= 0; i--) if (grades.get(i).accepts(dev, gb)) return passed(grades.get(i));
        boolean lowSide = dev < first.acceptLowPct(gb) || dev <= last.acceptHighPct(gb) && dev < 0;
        return rejected(r, Reason.GUARD_BAND, lowSide);
    }

    /**
     * The deviations at which {@link #byValue(Recipe, double)} can change its outcome: every limit and accepted limit of
     * every grade, the nominal, and the middle of the outermost window (the guard side of a concentric plan). Between
     * two neighbours the outcome is one.
     */
    public static double[] valueEdges(Recipe r) {
        GuardBand gb = r.guard();
        var grades = r.grades();
        java.util.TreeSet<Double> e = new java.util.TreeSet<>();
        for (Grade g : grades) {
            e.add(g.lowPct());
            e.add(g.highPct());
            e.add(g.acceptLowPct(gb));
            e.add(g.acceptHighPct(gb));
        }
        e.add(0.0);
        Grade last = grades.get(grades.size() - 1);
        e.add((last.lowPct() + last.highPct()) / 2);
        return e.stream().mapToDouble(Double::doubleValue).toArray();
    }

    private static Grading.Outcome passed(Grade g) {
        return new Grading.Outcome(g.bin(), g.name(), Verdict.PASS, Reason.IN_GRADE);
    }

    /** A clean reading that failed: its reject bin; a guard-band reject on the low or high side. */
    private static Grading rejected(Recipe r, Reason reason, boolean lowSide, Grading.Measurement m, Grading.Value v) {
        return new Grading(rejected(r, reason, lowSide), m, v);
    }

    private static Grading.Outcome rejected(Recipe r, Reason reason, boolean lowSide) {
        RejectBins rb = r.reject();
        int bin = reason == Reason.GUARD_BAND ? rb.guardBin(lowSide) : rb.bin(reason.rejectClass());
        String cls = reason == Reason.GUARD_BAND ? (lowSide ? "low" : "high") : reason.rejectClass().key();
        return new Grading.Outcome(bin, cls, Verdict.FAIL, reason);
    }

    /** A part that could not be measured at all (meter failure): retest, then the fault or overload bin. */
    public static Grading fault(Recipe recipe, FaultKind kind, int attempt) {
        return unclean(recipe, attempt, kind.reason(), null);
    }

    /**
     * A part that is not measured for a reason outside the part (line paused, meter faulted, line
     * busy): always sent back, never counted against the retest limit.
     */
    public static Grading notMeasured(Recipe recipe, Reason reason) {
        if (reason.kind() != Reason.Kind.NOT_MEASURED) throw new IllegalArgumentException(reason + " is not a not-measured reason");
        return new Grading(new Grading.Outcome(recipe.retest().bin(), "retest", Verdict.RETEST, reason), null, null);
    }

    /** No clean reading: retest while the recipe allows, then the reason's reject bin. No value, ever. */
    private static Grading unclean(Recipe recipe, int attempt, Reason reason, Grading.Measurement m) {
        boolean again = attempt < recipe.retest().count();
        int bin = again ? recipe.retest().bin() : recipe.reject().bin(reason.rejectClass());
        String grade = again ? "retest" : reason.rejectClass().key();
        return new Grading(new Grading.Outcome(bin, grade, again ? Verdict.RETEST : Verdict.FAIL, reason), m, null);
    }
}
