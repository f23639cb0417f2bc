package net.zbin.core;

import java.time.Instant;
import java.util.List;

/**
 * The decisions of one line in order, the same for the live line, {@code replay} and {@code tune}: how a reading
 * of each kind is graded, which lot a decision belongs to, and what the line monitor makes of it. A decision of
 * another lot (or recipe) than the one before starts the monitor's lot figures again — on every path alike, so a
 * replayed multi-lot log raises the alarms the line raised. Not thread-safe: one owner (the daemon guards it).
 */
public final class LineEngine {
    private final FixtureCheck.Limits checks;
    private Recipe recipe;
    private Recipe[] plan;
    private LineMonitor monitor;
    private String lot;
    private String lotRecipe;

    /**
     * @param settings the monitor's settings (the recipe's, with any line-wide override applied)
     * @param checks   the limits of the handler's open/short checks (the line config's)
     */
    public LineEngine(Recipe recipe, MonitorSettings settings, FixtureCheck.Limits checks) {
        this.checks = checks;
        this.recipe = recipe;
        this.plan = PartSession.plan(recipe);
        this.monitor = new LineMonitor(settings, checks, recipe);
    }

    /** An engine with the recipe's own monitor settings and the default check limits (a reading file with no line). */
    public static LineEngine of(Recipe recipe) { return new LineEngine(recipe, recipe.monitor(), FixtureCheck.Limits.DEFAULT); }

    public Recipe recipe() { return recipe; }

    /**
     * Grades a reading the meter just gave, by the presentation's kind: a part by value and gates, an open or short
     * check against the stored compensation and the line's check limits, a reference part both ways.
     *
     * @param comp    the compensation in force (null: none)
     * @param attempt 0 for a first presentation, n for the n-th retest
     */
    public Grading grade(Trigger.Kind kind, Reading reading, Compensation comp, int attempt) {
        return grade(recipe, checks, kind, reading, comp, attempt);
    }

    /** The same under a given recipe and check limits (the measuring thread's, which owns no engine). */
    public static Grading grade(Recipe recipe, FixtureCheck.Limits checks, Trigger.Kind kind, Reading reading, Compensation comp, int attempt) {
        return switch (kind) {
            case PART -> Grader.grade(recipe, reading, comp, attempt);
            case OPEN -> FixtureCheck.open(recipe, reading, comp, checks);
            case SHORT -> FixtureCheck.shortBar(recipe, reading, comp, checks);
            case REFERENCE -> FixtureCheck.reference(recipe, reading, comp, attempt);
        };
    }

    /**
     * A recorded reading graded as the line graded it ({@link Grader#recorded}), as the decision it was: its seq, part
     * and lot; a mean of n readings with the guard band of such a mean.
     */
    public Decision regrade(RecordedReading row) {
        int n = row.readings();
        Recipe r = n <= plan.length ? plan[n - 1] : recipe.toBuilder().guard(recipe.guard().forReadings(n)).build();
        Grading g = Grader.recorded(r, row);
        if (n > 1) g = g.withReadings(n);
        return new Decision(row.seq() >= 0 ? row.seq() : row.line(), row.part(), row.lot(), row.kind(),
                recipe.name(), g, Double.NaN, false, row.attempt());
    }

    /**
     * One decision, in the order the line made them. A decision of another lot or recipe than the last starts the
     * monitor's lot figures (and charts) again. Returns the alarms it raised or cleared.
     */
    public List<AlarmCode.Change> observe(Decision d) {
        if (!d.lot().equals(lot) || !d.recipe().equals(lotRecipe)) {
            lot = d.lot();
            lotRecipe = d.recipe();
            monitor.startLot(recipe);
        }
        return monitor.observe(d);
    }

    /** Starts a presentation of the given kind: feed it readings until it decides. */
    public PartSession session(Trigger.Kind kind, Compensation comp, int attempt) {
        return new PartSession(plan, checks, kind, comp, attempt);
    }

    /** A recipe change: a new monitor with {@code monitorSettings}; the next decision starts a lot. */
    public void recipe(Recipe r, MonitorSettings monitorSettings) {
        recipe = r;
        plan = PartSession.plan(r);
        monitor = new LineMonitor(monitorSettings, checks, r);
        lot = null;
    }

    /** The compensation now in force; judged at once against the recipe's need of it. */
    public List<AlarmCode.Change> compensation(Compensation comp, Instant now) {
        return compensation(comp, List.of(), now);
    }

    /** The same with the compensation at each later step's frequency of the plan, in step order. */
    public List<AlarmCode.Change> compensation(Compensation comp, List<Compensation> atSteps, Instant now) {
        return monitor.compensation(comp, atSteps, recipe.compensationRequired() || recipe.needsOpenCompensation()
                || recipe.needsShortCompensation(), now);
    }

    /** The compensation's age, judged now. */
    public List<AlarmCode.Change> tick(Instant now) { return monitor.tick(now); }

    public LineMonitor.Snapshot snapshot(Instant now) { return monitor.snapshot(now); }

    /**
     * What the decisions built up, to carry it across a restart of the daemon: the lot and recipe the monitor's lot
     * figures are for (null before the first decision) and the monitor's state.
     */
    public record State(String lot, String lotRecipe, LineMonitor.State monitor) {
        public State {
            java.util.Objects.requireNonNull(monitor, "monitor");
        }
    }

    public State state() { return new State(lot, lotRecipe, monitor.state()); }

    /** Takes up {@code st}, a {@link #state()} of an engine under the same recipe and monitor settings; returns the alarm changes. */
    public List<AlarmCode.Change> restore(State st) {
        List<AlarmCode.Change> out = monitor.restore(st.monitor());
        lot = st.lot();
        lotRecipe = st.lotRecipe();
        return out;
    }
}
