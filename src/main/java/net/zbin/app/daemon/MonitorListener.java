package net.zbin.app.daemon;

import java.time.Clock;
import java.util.List;
import net.zbin.core.AlarmCode;
import net.zbin.core.Compensation;
import net.zbin.core.LineEngine;
import net.zbin.core.LineMonitor;
import net.zbin.core.Recipe;
import net.zbin.io.DecisionFields;
import net.zbin.io.LineConfig;

/**
 * The line monitor on the daemon's decisions: a {@link DecisionListener} that feeds the core monitor and
 * turns its alarm changes into alarms of the line. A new lot or recipe starts the monitor's lot figures
 * again; the compensation in force is told to it when it changes. Thread-safe (the measuring thread
 * writes, the ticker reads and ticks).
 */
final class MonitorListener implements DecisionListener {
    private final LineConfig cfg;
    private final LineMode mode;
    private final Clock clock;
    private final LineEngine engine;
    private boolean recovering;

    /** The line's monitor under a recipe; the charts' limits taken from the line's state folder where they still meet the budget. */
    MonitorListener(LineConfig cfg, LineMode mode, Clock clock, Recipe recipe) {
        this.cfg = cfg;
        this.mode = mode;
        this.clock = clock;
        this.recalled = net.zbin.io.ChartLimits.recall(cfg.stateDir(), cfg.line(), cfg.monitorSettings(recipe));
        this.engine = cfg.engine(recipe);
    }

    /** Whether the charts' limits at construction were read back rather than solved. */
    private final boolean recalled;

    /** Keeps the limits solved at construction in the line's state folder (once the line holds its lock: the folder is its). */
    void keepLimits(Recipe recipe) {
        if (!recalled) keep(recipe);
    }

    private void keep(Recipe r) {
        var s = cfg.monitorSettings(r);
        net.zbin.io.ChartLimits.keep(cfg.stateDir(), cfg.line(), s, s.design());
    }

    @Override
    public synchronized void decided(net.zbin.core.DecisionEvent e) {
        forward(engine.observe(e.decision()));
    }

    /** While true, alarms are known again but not written to the alarm history (the record log is being replayed). */
    synchronized void recovering(boolean r) { recovering = r; }

    /**
     * A recipe change: a new monitor with its settings. The old recipe's alarms are cleared first, and the new
     * monitor judges the compensation at once, so an alarm of another recipe never stays on the line.
     */
    synchronized void recipe(Recipe r, Compensation comp, List<Compensation> atSteps) {
        mode.clearRecipeBound("recipe changed to " + r.name());
        boolean known = net.zbin.io.ChartLimits.recall(cfg.stateDir(), cfg.line(), cfg.monitorSettings(r)); // a recipe run before: no solve on this thread
        engine.recipe(r, cfg.monitorSettings(r));
        if (!known) keep(r);
        compensation(comp, atSteps);
    }

    synchronized void compensation(Compensation comp) { compensation(comp, List.of()); }

    /** The compensation at the recipe's frequency and at each later step's of its plan (in step order). */
    synchronized void compensation(Compensation comp, List<Compensation> atSteps) {
        forward(engine.compensation(comp, atSteps, clock.instant()));
    }

    /** The ticker's look at the compensation's age: judged under the lock, the alarms sent after it (the measuring thread never waits on a send). */
    void tick() {
        List<AlarmCode.Change> changes;
        boolean rec;
        synchronized (this) {
            changes = engine.tick(clock.instant());
            rec = !recovering;
        }
        for (AlarmCode.Change c : changes) mode.alarm(c.code(), c.active(), c.message(), rec);
    }

    synchronized LineMonitor.Snapshot snapshot() { return engine.snapshot(clock.instant()); }

    /** What the decisions built up in the monitor (see {@link LineEngine#state}). */
    synchronized LineEngine.State state() { return engine.state(); }

    /** Takes up a {@link #state} of a monitor under the same recipe and settings; its alarms go to the line as read-back alarms do. */
    synchronized void restore(LineEngine.State s) { forward(engine.restore(s)); }

    /** A monitor of the line's recipe and settings that belongs to nothing, to try a state on. */
    LineEngine scratch() { return cfg.engine(engine.recipe()); }

    private void forward(List<AlarmCode.Change> changes) {
        for (AlarmCode.Change c : changes) mode.alarm(c.code(), c.active(), c.message(), !recovering);
    }
}
