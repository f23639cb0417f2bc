package net.zbin.core;

/**
 * One presentation, decided reading by reading: given a reading, either asks for another measurement or returns
 * the decision. A part whose value reads near an acceptance limit is measured again (the recipe's
 * {@link Remeasure}) while the caller says another reading fits the handler's deadline, and is decided on the mean
 * of its readings with the guard band of that mean. A reading that is not clean ends the session at once, with the
 * retest policy's answer: it is never averaged into a value. A part the value step passes is then read at each later
 * step of the plan ({@link Recipe#steps}, at that step's {@link #conditions}) and judged by its gates: a later step can
 * only reject. Pure: no I/O, no clock.
 */
public final class PartSession {
    private final Recipe[] byReadings;
    private final Trigger.Kind kind;
    private final Compensation comp;
    private final FixtureCheck.Limits checks;
    private final int attempt;
    private final java.util.function.DoubleFunction<Compensation> compAt;
    private double freqHz, sumR, sumX;
    private int n;
    /** 0 while the value step is read, k while later step k is. */
    private int step;
    private Grading passed;
    /** The later steps' readings (made at the first later step: a one-step plan allocates nothing for them). */
    private java.util.List<Grading.StepReading> taken;

    /**
     * @param byReadings the recipe as it judges the mean of 1, 2, … readings (index n − 1), see {@link #plan}
     * @param comp       the compensation in force (null: none)
     */
    public PartSession(Recipe[] byReadings, FixtureCheck.Limits checks, Trigger.Kind kind, Compensation comp, int attempt) {
        this(byReadings, checks, kind, comp, f -> comp != null && Compensation.matches(comp.freqHz(), f) ? comp : null, attempt);
    }

    /** @param compAt the compensation in force at a later step's frequency (null: none) */
    public PartSession(Recipe[] byReadings, FixtureCheck.Limits checks, Trigger.Kind kind, Compensation comp,
                       java.util.function.DoubleFunction<Compensation> compAt, int attempt) {
        this.compAt = compAt;
        this.byReadings = byReadings;
        this.checks = checks;
        this.kind = kind;
        this.comp = comp;
        this.attempt = attempt;
    }

    /** A recipe as it judges the mean of 1 … max_readings readings: the guard band of each mean. Build once per recipe. */
    public static Recipe[] plan(Recipe r) {
        Recipe[] out = new Recipe[r.remeasure().maxReadings()];
        out[0] = r;
        for (int i = 1; i < out.length; i++) out[i] = r.toBuilder().guard(r.guard().forReadings(i + 1)).build();
        return out;
    }

    /** Readings of the value step taken so far. */
    public int readings() { return n; }

    /** The conditions the next reading is to be taken at: the value step's, then each later step's. */
    public TestConditions conditions() { return step == 0 ? byReadings[0].test() : byReadings[0].steps().get(step - 1).test(); }

    /**
     * Takes a reading.
     *
     * @param anotherFits whether the handler's deadline leaves time for one more reading
     * @return the decision's grading, or null when the part is to be measured again
     */
    public Grading offer(Reading raw, boolean anotherFits) {
        if (step > 0) return offerStep(raw);
        Grading g = offerValue(raw, anotherFits);
        if (g == null) return null;
        if (kind != Trigger.Kind.PART || byReadings[0].steps().isEmpty() || g.verdict() != Verdict.PASS) return g;
        passed = g;
        step = 1;
        return null;
    }

    /** A later step's reading: on to the next step, or the decision (the value step's when every step passed). */
    private Grading offerStep(Reading raw) {
        Recipe r = byReadings[0];
        TestStep st = r.steps().get(step - 1);
        Grading.StepReading[] out = new Grading.StepReading[1];
        Grading fail = Grader.step(r, st, raw, compAt.apply(st.test().freqHz()), attempt, out);
        if (taken == null) taken = new java.util.ArrayList<>(r.steps().size());
        taken.add(out[0]);
        if (fail != null) // a gate keeps the value beside the reject, as the value step's gates do; a reading not clean has none
            return new Grading(fail.outcome(), passed.measured(), fail.verdict() == Verdict.FAIL && fail.reason().rejectClass() == Reason.RejectClass.GATE
                    ? passed.graded() : null, taken);
        if (step == r.steps().size()) return passed.withSteps(taken);
        step++;
        return null;
    }

    private Grading offerValue(Reading raw, boolean anotherFits) {
        if (n > 0 && (!raw.isFinite() || !Compensation.matches(raw.freqHz(), freqHz)))
            return LineEngine.grade(byReadings[0], checks, kind, raw, comp, attempt); // not clean: decided on it alone
        if (n == 0) freqHz = raw.freqHz();
        n++;
        sumR += raw.rOhm();
        sumX += raw.xOhm();
        Recipe r = byReadings[n - 1];
        Reading mean = n == 1 ? raw : new Reading(freqHz, sumR / n, sumX / n);
        Grading g = LineEngine.grade(r, checks, kind, mean, comp, attempt);
        if (n > 1) g = g.withReadings(n);
        boolean more = kind == Trigger.Kind.PART && n < byReadings.length && anotherFits && g.graded() != null && near(r, g.devPct());
        return more ? null : g;
    }

    /** Whether a deviation is within the recipe's {@code near_pct} of an acceptance limit of any grade (or inside a guard zone). */
    static boolean near(Recipe r, double devPct) {
        if (!Double.isFinite(devPct)) return false;
        double band = r.remeasure().nearPct();
        for (Grade g : r.grades()) {
            double lo = g.acceptLowPct(r.guard()), hi = g.acceptHighPct(r.guard());
            if (Math.abs(devPct - lo) <= band || Math.abs(devPct - hi) <= band) return true;
            if (devPct < lo && devPct >= g.lowPct() || devPct > hi && devPct <= g.highPct()) return true; // in the guard zone
        }
        return false;
    }
}
