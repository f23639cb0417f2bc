package net.zbin.core;

import java.util.Optional;

/**
 * Turns a raw reading into a grading under a recipe. Fail-safe: any reading that is not clean
 * (non-finite, wrong frequency, missing or mismatched compensation, open contact, short) — and any
 * meter failure, see {@link #fault} — is retested up to the recipe's count and then rejected; it
 * never reaches a value grade.
 */
public final class Grader {
    private Grader() {}

    /**
     * @param comp    compensation for the recipe frequency, or null if none is loaded
     * @param attempt 0 for the first presentation of the part, 1 for its first retest, …
     */
    public static Grading grade(Recipe recipe, Reading reading, Compensation comp, int attempt) {
        double f = reading.freqHz();
        RejectBins rb = recipe.reject();
        if (!reading.isFinite())
            return unclean(recipe, attempt, "non-finite", rb.fault(), "fault", reading, null, CompensationSource.NONE);
        if (!Compensation.matches(f, recipe.freqHz()))
            return unclean(recipe, attempt, "frequency-mismatch", rb.fault(), "fault", reading, null, CompensationSource.NONE);
        Impedance raw = new Impedance(f, reading.rOhm(), reading.xOhm());
        CompensationSource source = comp == null || !comp.isApplied() ? CompensationSource.NONE : comp.source();
        if (source == CompensationSource.NONE) return gradeCorrected(recipe, raw, reading, source, attempt, false, false);
        if (!Compensation.matches(comp.freqHz(), f))
            return unclean(recipe, attempt, "compensation-mismatch", rb.fault(), "fault", reading, null, source);
        Optional<Impedance> corrected = comp.correct(raw);
        if (corrected.isEmpty())
            return unclean(recipe, attempt, "open-contact", rb.contact(), "contact", reading, null, source);
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
        RejectBins rb = recipe.reject();
        double f = z.freqHz();
        if (!Compensation.matches(f, recipe.freqHz()))
            return unclean(recipe, attempt, "frequency-mismatch", rb.fault(), "fault", raw, null, source);
        boolean missing = source == CompensationSource.NONE && recipe.compensationRequired()
                || recipe.needsOpenCompensation() && !openCompensated
                || recipe.needsShortCompensation() && !shortCompensated;
        if (missing)
            return unclean(recipe, attempt, "no-compensation", rb.fault(), "fault", raw, null, source);
        double ideal = recipe.idealZOhm();
        ContactCheck contact = recipe.contact();
        if (contact.isOpen(recipe.partType(), ideal, z, openCompensated))
            return unclean(recipe, attempt, "open-contact", rb.contact(), "contact", raw, z, source);
        if (contact.isShort(ideal, z, shortCompensated))
            return unclean(recipe, attempt, "short", rb.shortBin(), "short", raw, z, source);
        if (contact.fixture().negativeBeyondResolution(z))
            return unclean(recipe, attempt, "negative-r", rb.fault(), "fault", raw, z, source);

        PrimaryParam param = recipe.primaryParam();
        EquivalentModel model = recipe.equivalentModel();
        double value = z.value(param);
        double dev = (value - recipe.nominal()) * 100 / recipe.nominal(); // exact at decimal edges: 930 of 1000 is −7 %
        if (!(value > 0) || !Double.isFinite(value))
            return done(rb.low(), "low", Verdict.FAIL, "wrong-sign", model, param, value, dev, raw, z, source);
        if (!recipe.plausible().admits(z))
            return done(rb.gate(), "gate", Verdict.FAIL, "phase-implausible", model, param, value, dev, raw, z, source);
        String gate = recipe.gates().firstFailure(z);
        if (gate != null)
            return done(rb.gate(), "gate", Verdict.FAIL, gate, model, param, value, dev, raw, z, source);
        return byValue(recipe, dev, model, param, value, raw, z, source);
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
     * Re-creates the grading of a reading that was not clean, from its reason code alone (replay
     * of a record whose reading is missing). Unknown codes count as a fault.
     */
    public static Grading byReason(Recipe recipe, String reason, int attempt) {
        RejectBins rb = recipe.reject();
        for (FaultKind k : FaultKind.values()) if (k.reason().equals(reason)) return fault(recipe, k, attempt);
        return switch (reason) {
            case "open-contact" -> unclean(recipe, attempt, reason, rb.contact(), "contact", null, null, CompensationSource.NONE);
            case "short" -> unclean(recipe, attempt, reason, rb.shortBin(), "short", null, null, CompensationSource.NONE);
            case NOT_MEASURED_PAUSED, NOT_MEASURED_FAULTED -> notMeasured(recipe, reason);
            default -> unclean(recipe, attempt, reason, rb.fault(), "fault", null, null, CompensationSource.NONE);
        };
    }

    /** Reason code: the line was paused, the part was not measured. */
    public static final String NOT_MEASURED_PAUSED = "line-paused";
    /** Reason code: the line is in fault (meter link down), the part was not measured. */
    public static final String NOT_MEASURED_FAULTED = "line-fault";

    private static Grading byValue(Recipe r, double dev, EquivalentModel model, PrimaryParam param, double value,
                                   Reading reading, Impedance z, CompensationSource source) {
        GuardBand gb = r.guard();
        var grades = r.grades();
        Grade first = grades.get(0), last = grades.get(grades.size() - 1);
        if (r.mode() == GradingMode.CONCENTRIC) {
            for (Grade g : grades)
                if (g.accepts(dev, gb))
                    return done(g.bin(), g.name(), Verdict.PASS, "in-grade", model, param, value, dev, reading, z, source);
            if (dev < last.lowPct() || dev > last.highPct())
                return outside(r, dev < last.lowPct(), model, param, value, dev, reading, z, source);
            return guarded(r, dev < (last.lowPct() + last.highPct()) / 2, model, param, value, dev, reading, z, source);
        }
        if (dev < first.lowPct() || dev > last.highPct())
            return outside(r, dev < first.lowPct(), model, param, value, dev, reading, z, source);
        // Adjacent ranges, every edge guarded; at an unguarded inner edge the upper range takes the part.
        for (int i = grades.size() - 1; i >= 0; i--) {
            Grade g = grades.get(i);
            if (g.accepts(dev, gb))
                return done(g.bin(), g.name(), Verdict.PASS, "in-grade", model, param, value, dev, reading, z, source);
        }
        boolean lowSide = dev < first.acceptLowPct(gb) || dev <= last.acceptHighPct(gb) && dev < 0;
        return guarded(r, lowSide, model, param, value, dev, reading, z, source);
    }

    private static Grading guarded(Recipe r, boolean lowSide, EquivalentModel model, PrimaryParam param, double value,
                                   double dev, Reading reading, Impedance z, CompensationSource source) {
        return done(r.reject().guardBin(lowSide), lowSide ? "low" : "high", Verdict.FAIL, "guard-band", model, param,
                value, dev, reading, z, source);
    }

    private static Grading outside(Recipe r, boolean low, EquivalentModel model, PrimaryParam param, double value,
                                   double dev, Reading reading, Impedance z, CompensationSource source) {
        return done(low ? r.reject().low() : r.reject().high(), low ? "low" : "high", Verdict.FAIL,
                low ? "value-low" : "value-high", model, param, value, dev, reading, z, source);
    }

    /** A part that could not be measured at all (meter failure): retest, then the fault or overload bin. */
    public static Grading fault(Recipe recipe, FaultKind kind, int attempt) {
        int bin = kind == FaultKind.OVERLOAD ? recipe.reject().overload() : recipe.reject().fault();
        String cls = kind == FaultKind.OVERLOAD ? "overload" : "fault";
        return unclean(recipe, attempt, kind.reason(), bin, cls, null, null, CompensationSource.NONE);
    }

    /**
     * A part that is not measured for a reason outside the part (line paused, meter faulted):
     * always sent back, never counted against the retest limit.
     */
    public static Grading notMeasured(Recipe recipe, String reason) {
        return new Grading(recipe.retest().bin(), "retest", Verdict.RETEST, reason, null, null, Double.NaN, Double.NaN,
                recipe.freqHz(), Double.NaN, Double.NaN, Double.NaN, Double.NaN, CompensationSource.NONE);
    }

    private static Grading unclean(Recipe recipe, int attempt, String reason, int rejectBin, String cls,
                                   Reading reading, Impedance z, CompensationSource source) {
        boolean again = attempt < recipe.retest().count();
        return done(again ? recipe.retest().bin() : rejectBin, again ? "retest" : cls,
                again ? Verdict.RETEST : Verdict.FAIL, reason, null, null, Double.NaN, Double.NaN,
                reading == null ? new Reading(recipe.freqHz(), Double.NaN, Double.NaN) : reading, z, source);
    }

    private static Grading done(int bin, String grade, Verdict verdict, String reason, EquivalentModel model,
                                PrimaryParam param, double value, double dev, Reading reading, Impedance z,
                                CompensationSource source) {
        return new Grading(bin, grade, verdict, reason, model, param, value, dev, reading.freqHz(),
                z == null ? Double.NaN : z.rOhm(), z == null ? Double.NaN : z.xOhm(),
                reading.rOhm(), reading.xOhm(), source);
    }
}
