package net.zbin.core;

import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;

/**
 * The line monitor of one lot: capability of the graded value, drift of the value and of the loss,
 * rolling rates, and the compensation watchdog (open/short check residuals, reference part, age, missing
 * compensation, negative-R rate, and the population check that tells an additive offset from the
 * fixture from a proportional shift of the parts). Pure: time comes with each observation. Single owner;
 * {@link #snapshot} is the immutable view.
 */
public final class LineMonitor {
    /** What the population check concluded at the last value-drift alarm. */
    public enum Cause { NONE, ADDITIVE, PROPORTIONAL, UNKNOWN }

    private final MonitorSettings s;
    private final FixtureCheck.Limits checkLimits;
    private Recipe recipe;
    private DriftChart value, loss;
    /** The charts' design for {@link #s}, made once: every lot's charts use it. */
    private final ChartDesign design;
    private final RunningStats dev = new RunningStats();
    private final Window window;
    private final EnumMap<AlarmCode, String> active = new EnumMap<>(AlarmCode.class);
    private Cause cause = Cause.NONE;
    private String causeText = "";
    private double openResidual = Double.NaN, openStart = Double.NaN, openG = Double.NaN;
    private double shortR = Double.NaN, shortX = Double.NaN, shortStartR = Double.NaN, shortStartX = Double.NaN;
    private double refAbs = Double.NaN, refStart = Double.NaN;
    /** The fixture checks seen while the value's baseline was learned: the fixture's own baseline over the same parts. */
    private final RunningStats openLearn = new RunningStats(), shortRLearn = new RunningStats(), shortXLearn = new RunningStats(),
            refLearn = new RunningStats();
    private int refOffRun, refOkRun;
    private Compensation comp;
    /** The compensation at each later step's frequency of the plan (empty for a one-step recipe). */
    private List<Compensation> stepComps = List.of();
    private boolean compNeeded;
    private long parts;

    public LineMonitor(MonitorSettings s, FixtureCheck.Limits checkLimits, Recipe recipe) {
        this.s = s;
        this.checkLimits = checkLimits;
        this.design = s.design();
        this.window = new Window(s.windowParts());
        startLot(recipe);
    }

    /** A new lot (or recipe): figures and charts start again. Alarms of the fixture stay as they are. */
    public void startLot(Recipe r) {
        recipe = r;
        value = s.statedBaseline() ? new DriftChart(s, design, s.baselineMeanPct(), s.baselineSigmaPct()) : new DriftChart(s, design);
        loss = new DriftChart(s, design);
        dev.reset();
        window.clear();
        cause = Cause.NONE;
        causeText = "";
        parts = 0;
        openStart = openResidual;
        shortStartR = shortR;
        shortStartX = shortX;
        refStart = refAbs;
        openLearn.reset();
        shortRLearn.reset();
        shortXLearn.reset();
        refLearn.reset();
    }

    /** The compensation now in force at the recipe's frequency (null: none), and whether the recipe needs it. */
    public List<AlarmCode.Change> compensation(Compensation c, boolean needed, Instant now) {
        return compensation(c, List.of(), needed, now);
    }

    /**
     * The same with the compensation at each later step's frequency (in the recipe's step order, null: none): a plan
     * is compensated only when every step's frequency is, and its age is that of the oldest.
     */
    public List<AlarmCode.Change> compensation(Compensation c, List<Compensation> atSteps, boolean needed, Instant now) {
        comp = c;
        stepComps = new ArrayList<>(atSteps);
        compNeeded = needed;
        return tick(now);
    }

    /** Age and presence of the compensation; call every few seconds. */
    public List<AlarmCode.Change> tick(Instant now) {
        List<AlarmCode.Change> out = new ArrayList<>();
        boolean applied = comp != null && comp.isApplied();
        double missingAt = applied ? Double.NaN : recipe.freqHz();
        Instant oldest = applied ? comp.takenAt() : null;
        for (int i = 0; i < stepComps.size() && i < recipe.steps().size(); i++) {
            Compensation sc = stepComps.get(i);
            if (sc == null || !sc.isApplied()) {
                if (Double.isNaN(missingAt)) missingAt = recipe.steps().get(i).test().freqHz();
            } else if (oldest != null && sc.takenAt() != null && sc.takenAt().isBefore(oldest)) oldest = sc.takenAt();
        }
        set(out, AlarmCode.COMPENSATION_MISSING, compNeeded && !Double.isNaN(missingAt),
                "recipe " + recipe.name() + " grades nothing without compensation at " + SiValue.format(missingAt, "Hz") + ", and none is stored");
        if (applied && oldest != null) {
            double ageH = Duration.between(oldest, now).toSeconds() / 3600.0;
            set(out, AlarmCode.COMPENSATION_OLD, ageH > s.compMaxAgeH(),
                    String.format(java.util.Locale.ROOT, "compensation is %.1f h old (limit %.1f h)", ageH, s.compMaxAgeH()));
        } else set(out, AlarmCode.COMPENSATION_OLD, false, "");
        return out;
    }

    /** One decision. Returns the alarms it raised or cleared. */
    public List<AlarmCode.Change> observe(Decision d) {
        List<AlarmCode.Change> out = new ArrayList<>();
        Grading g = d.grading();
        switch (d.kind()) {
            case PART -> part(g, out);
            case OPEN -> open(g, out);
            case SHORT -> shortBar(g, out);
            case REFERENCE -> reference(g, out);
        }
        return out;
    }

    private void part(Grading g, List<AlarmCode.Change> out) {
        window.add(g);
        double neg = window.pct(Reason.NEGATIVE_R);
        boolean negOn = neg > s.maxNegativeRPct() || active.containsKey(AlarmCode.NEGATIVE_R_RATE) && neg > s.maxNegativeRPct() / 2;
        if (window.size() >= Math.min(100, s.windowParts()) && negOn != active.containsKey(AlarmCode.NEGATIVE_R_RATE))
            set(out, AlarmCode.NEGATIVE_R_RATE, negOn,
                    String.format(java.util.Locale.ROOT, "%.2f %% of the last %d parts read R below zero after compensation (limit %.2f %%): stale compensation?",
                            neg, window.size(), s.maxNegativeRPct()));
        if (g.verdict() == Verdict.RETEST || g.graded() == null || !Double.isFinite(g.devPct())) return;
        parts++;
        dev.add(g.devPct());
        // The charts watch the parts that passed: a lossy or out-of-tolerance outlier is the grader's business,
        // not a drift of the process, and one of them would otherwise move a subgroup mean by several σ.
        if (g.verdict() != Verdict.PASS) return;
        long before = value.charted();
        int v = value.add(g.devPct());
        if (v == 0 && value.alarm() && cause != Cause.ADDITIVE && value.charted() > before) {
            // While the alarm stands, each new point and each new fixture check can settle the call.
            Cause was = cause;
            classify();
            if (cause == Cause.ADDITIVE && was != Cause.ADDITIVE)
                set(out, AlarmCode.COMPENSATION_OFFSET, true, "the shift is an additive offset from the fixture: " + causeText);
        }
        if (v == 1 || v == -1) {
            classify();
            set(out, AlarmCode.VALUE_DRIFT, true, String.format(java.util.Locale.ROOT, "%s drifted %+.3f %% from the lot's baseline %+.3f %% (σ %.3f %%): %s",
                    g.param().label(), value.shift(), value.baselineMean(), value.baselineSigma(), causeText));
            set(out, AlarmCode.COMPENSATION_OFFSET, cause == Cause.ADDITIVE, "the shift is an additive offset from the fixture: " + causeText);
        } else if (v == 2) {
            set(out, AlarmCode.VALUE_DRIFT, false, "value back at its baseline");
            set(out, AlarmCode.COMPENSATION_OFFSET, false, "value back at its baseline");
        }
        double l = lossOf(g);
        int lv = loss.add(l);
        if (lv == 1 || lv == -1)
            set(out, AlarmCode.LOSS_DRIFT, true, String.format(java.util.Locale.ROOT, "%s drifted %s by %.4g from the lot's baseline %.4g (σ %.4g): contacts or parts?",
                    lossName(), lv > 0 ? "up" : "down", loss.shift(), loss.baselineMean(), loss.baselineSigma()));
        else if (lv == 2) set(out, AlarmCode.LOSS_DRIFT, false, lossName() + " back at its baseline");
    }

    /** D for capacitors, ESR for inductors and resistors (series R in Ω). */
    private double lossOf(Grading g) { return recipe.partType() == PartType.CAPACITOR ? g.d() : g.esrOhm(); }

    private String lossName() { return recipe.partType() == PartType.CAPACITOR ? "D" : "ESR"; }

    /**
     * Additive or proportional? The population shift in the value's own unit is compared with what the
     * fixture checks saw since the lot started: an open check (C) or short check (L, R) that moved by the
     * same amount, or a reference part that moved with the parts, says the fixture; checks that did not
     * move while the parts did say the parts changed.
     */
    private void classify() {
        double shiftAbs = value.shift() / 100 * recipe.nominal();
        double se = value.shiftError() / 100 * recipe.nominal();
        double evidence = fixtureMove();
        double ref = Double.isNaN(refAbs) ? Double.NaN : refAbs - since(refLearn, refStart);
        String unit = recipe.partType().unit();
        String moved = SiValue.format(shiftAbs, unit);
        if (Double.isNaN(evidence) && Double.isNaN(ref)) {
            cause = Cause.UNKNOWN;
            causeText = "every part reads " + moved + " off; no fixture check since the lot started to tell the fixture from the parts";
            return;
        }
        double e = Double.isNaN(evidence) ? ref : evidence;
        // Additive when the fixture moved the same way by between half and twice the parts' shift (the two are
        // measured at different moments of a ramp, and a chart signals on the first few points of a shift, so a
        // ratio is the robust test), or within three standard errors of it.
        double ratio = e / shiftAbs;
        if (ratio >= 0.5 && ratio <= 2 || Math.abs(e - shiftAbs) <= 3 * se && Math.abs(e) > 0.25 * Math.abs(shiftAbs)) {
            cause = Cause.ADDITIVE;
            causeText = "additive offset: every part reads " + moved + " off and the " + (Double.isNaN(evidence) ? "reference part" : "fixture check")
                    + " moved " + SiValue.format(e, unit) + " too — the compensation is stale, compensate again";
        } else if (Math.abs(e) <= 0.25 * Math.abs(shiftAbs) + 3 * se) {
            cause = Cause.PROPORTIONAL;
            causeText = "proportional shift of the parts (" + String.format(java.util.Locale.ROOT, "%+.3f %%", value.shift())
                    + "): the fixture checks did not move (" + SiValue.format(e, unit) + "), so the parts themselves changed";
        } else {
            cause = Cause.UNKNOWN;
            causeText = "every part reads " + moved + " off; the fixture checks moved " + SiValue.format(e, unit) + ", which explains it only in part";
        }
    }

    /**
     * How far the fixture moved from where it stood while the parts' baseline was learned (the mean of the checks
     * in that span, else the first check of the lot), in the value's unit (NaN without checks). Measured against the
     * same span as the parts' shift, a fixture that ramps explains the parts' shift in full, not twice over.
     */
    private double fixtureMove() {
        return switch (recipe.partType()) {
            case CAPACITOR -> Double.isNaN(openResidual) ? Double.NaN : openResidual - since(openLearn, openStart);
            case INDUCTOR -> Double.isNaN(shortX) ? Double.NaN : (shortX - since(shortXLearn, shortStartX)) / (2 * Math.PI * recipe.freqHz());
            case RESISTOR -> Double.isNaN(shortR) ? Double.NaN : shortR - since(shortRLearn, shortStartR);
        };
    }

    private static double since(RunningStats learned, double first) { return learned.count() > 0 ? learned.mean() : first; }

    /** An open check: its R/X are the residual after the stored open (1 / (Ycheck − Yopen)). */
    private void open(Grading g, List<AlarmCode.Change> out) {
        Impedance z = g.impedance();
        if (z == null || g.reason() == Reason.NO_COMPENSATION) return;
        openResidual = z.zOhm() > 1e300 ? 0 : z.cpF();
        openG = z.zOhm() > 1e300 ? 0 : z.gS();
        if (Double.isNaN(openStart)) openStart = openResidual;
        if (value.learning()) openLearn.add(openResidual);
        double lim = checkLimits.openDriftMaxF();
        boolean on = Math.abs(openResidual) > lim || active.containsKey(AlarmCode.OPEN_RESIDUAL) && Math.abs(openResidual) > lim / 2;
        set(out, AlarmCode.OPEN_RESIDUAL, on, "the open check reads " + SiValue.format(openResidual, "F") + " (and "
                + SiValue.format(openG, "S") + ") beyond the stored open (limit " + SiValue.format(lim, "F") + ")");
    }

    /** A short check: its R/X are the residual after the stored short (Zcheck − Zshort). */
    private void shortBar(Grading g, List<AlarmCode.Change> out) {
        Impedance z = g.impedance();
        if (z == null || g.reason() == Reason.NO_COMPENSATION) return;
        shortR = z.rOhm();
        shortX = z.xOhm();
        if (Double.isNaN(shortStartR)) {
            shortStartR = shortR;
            shortStartX = shortX;
        }
        if (value.learning()) {
            shortRLearn.add(shortR);
            shortXLearn.add(shortX);
        }
        double lim = checkLimits.shortDriftMaxOhm();
        boolean on = z.zOhm() > lim || active.containsKey(AlarmCode.SHORT_RESIDUAL) && z.zOhm() > lim / 2;
        set(out, AlarmCode.SHORT_RESIDUAL, on, "the short check reads " + SiValue.format(shortR, "ohm") + " and "
                + SiValue.format(z.lsH(), "H") + " beyond the stored short (limit " + SiValue.format(lim, "ohm") + ")");
    }

    private void reference(Grading g, List<AlarmCode.Change> out) {
        if (Double.isFinite(g.devPct())) {
            refAbs = g.devPct() / 100 * recipe.nominal();
            if (Double.isNaN(refStart)) refStart = refAbs;
            if (value.learning()) refLearn.add(refAbs);
        }
        boolean off = g.reason() == Reason.REFERENCE_OFF;
        refOffRun = off ? refOffRun + 1 : 0;
        refOkRun = off ? 0 : refOkRun + 1;
        if (refOffRun >= 2) set(out, AlarmCode.REFERENCE_OFF, true, "the reference part read outside its grade twice in a row ("
                + (Double.isFinite(g.devPct()) ? String.format(java.util.Locale.ROOT, "%+.3f %%", g.devPct()) : g.reason().code()) + ")");
        else if (refOkRun >= 2) set(out, AlarmCode.REFERENCE_OFF, false, "the reference part reads right again");
    }

    private void set(List<AlarmCode.Change> out, AlarmCode code, boolean on, String message) {
        if (on == active.containsKey(code)) return;
        if (on) active.put(code, message);
        else active.remove(code);
        out.add(new AlarmCode.Change(code, on, message));
    }

    /** The alarms the decisions raise and clear (the compensation's presence and age are judged by {@link #tick} instead). */
    private static boolean fromDecisions(AlarmCode c) {
        return c.recipeBound() && c != AlarmCode.COMPENSATION_MISSING && c != AlarmCode.COMPENSATION_OLD;
    }

    /**
     * Everything the decisions built up in the monitor, to carry it across a restart of the daemon: the lot's charts,
     * figures and window, the fixture checks, and the alarms the decisions raised (by code). The compensation and its
     * alarms are not in it: the restarted line tells the monitor its compensation itself.
     */
    public record State(DriftChart.State value, DriftChart.State loss, RunningStats.State dev, Window.State window,
                        Map<String, String> active, Cause cause, String causeText, double openResidual, double openStart,
                        double openG, double shortR, double shortX, double shortStartR, double shortStartX, double refAbs,
                        double refStart, RunningStats.State openLearn, RunningStats.State shortRLearn,
                        RunningStats.State shortXLearn, RunningStats.State refLearn, int refOffRun, int refOkRun, long parts) {
        public State {
            active = java.util.Collections.unmodifiableMap(new java.util.TreeMap<>(active));
        }
    }

    public State state() {
        Map<String, String> a = new java.util.TreeMap<>();
        active.forEach((k, v) -> {
            if (fromDecisions(k)) a.put(k.code(), v);
        });
        return new State(value.state(), loss.state(), dev.state(), window.state(), a, cause, causeText, openResidual, openStart, openG,
                shortR, shortX, shortStartR, shortStartX, refAbs, refStart, openLearn.state(), shortRLearn.state(), shortXLearn.state(),
                refLearn.state(), refOffRun, refOkRun, parts);
    }

    /**
     * Takes up {@code st}, a {@link #state()} of a monitor under the same settings and recipe. Returns the changes of
     * the decisions' alarms that brings (the compensation's alarms stay as they are).
     *
     * @throws IllegalArgumentException an alarm code this version does not know
     */
    public List<AlarmCode.Change> restore(State st) {
        Map<AlarmCode, String> want = new EnumMap<>(AlarmCode.class);
        st.active().forEach((k, v) -> want.put(AlarmCode.parse(k), v));
        value.restore(st.value());
        loss.restore(st.loss());
        dev.restore(st.dev());
        window.restore(st.window());
        cause = st.cause();
        causeText = st.causeText();
        openResidual = st.openResidual();
        openStart = st.openStart();
        openG = st.openG();
        shortR = st.shortR();
        shortX = st.shortX();
        shortStartR = st.shortStartR();
        shortStartX = st.shortStartX();
        refAbs = st.refAbs();
        refStart = st.refStart();
        openLearn.restore(st.openLearn());
        shortRLearn.restore(st.shortRLearn());
        shortXLearn.restore(st.shortXLearn());
        refLearn.restore(st.refLearn());
        refOffRun = st.refOffRun();
        refOkRun = st.refOkRun();
        parts = st.parts();
        List<AlarmCode.Change> out = new ArrayList<>();
        for (AlarmCode c : AlarmCode.values()) {
            if (!fromDecisions(c)) continue;
            boolean was = active.containsKey(c), wanted = want.containsKey(c);
            if (was && !wanted) set(out, c, false, "as before the restart");
            else if (wanted && !was) set(out, c, true, want.get(c));
            else if (wanted) active.put(c, want.get(c));
        }
        return out;
    }

    /** Immutable figures of the lot. */
    public record Snapshot(long parts, double devMeanPct, double devSigmaPct, double cp, double cpk, DriftChart.View value,
                           DriftChart.View loss, String lossName, Window.View window, Cause cause, String causeText,
                           double openResidualF, double openResidualGS, double shortResidualOhm, double shortResidualH,
                           double referenceOffsetPct, String compSource, double compAgeH, double compFreqHz,
                           Map<AlarmCode, String> active) {}

    public Snapshot snapshot(Instant now) {
        Grade widest = recipe.mode() == GradingMode.CONCENTRIC ? recipe.grades().get(recipe.grades().size() - 1) : null;
        double lsl = widest != null ? widest.lowPct() : recipe.grades().get(0).lowPct();
        double usl = widest != null ? widest.highPct() : recipe.grades().get(recipe.grades().size() - 1).highPct();
        double sd = dev.stdDev();
        boolean applied = comp != null && comp.isApplied();
        return new Snapshot(parts, dev.mean(), sd, Capability.cp(lsl, usl, sd), Capability.cpk(lsl, usl, dev.mean(), sd), value.view(),
                loss.view(), lossName(), window.view(), cause, causeText, openResidual, openG, shortR,
                Double.isNaN(shortX) ? Double.NaN : shortX / (2 * Math.PI * recipe.freqHz()), Double.isNaN(refAbs) ? Double.NaN : refAbs / recipe.nominal() * 100,
                applied ? comp.source().key() : "none",
                applied && comp.takenAt() != null ? Duration.between(comp.takenAt(), now).toSeconds() / 3600.0 : Double.NaN,
                comp == null ? Double.NaN : comp.freqHz(), Map.copyOf(active));
    }

    /** The last {@code size} part presentations: rates of outcomes, kept up to date in O(1) a presentation. */
    public static final class Window {
        private final byte[] reasons;
        private final boolean[] passed, finished;
        private final int[] perReason = new int[Reason.values().length];
        private int next, size, nPassed, nFinished;

        public record View(int presentations, double yieldPct, double retestPct, double openContactPct, double shortPct,
                           double faultPct, double negativeRPct) {}

        Window(int capacity) {
            reasons = new byte[capacity];
            passed = new boolean[capacity];
            finished = new boolean[capacity];
        }

        void clear() {
            next = 0;
            size = 0;
            nPassed = 0;
            nFinished = 0;
            java.util.Arrays.fill(perReason, 0);
        }

        void add(Grading g) { add(g.reason(), g.verdict() == Verdict.PASS, g.verdict() != Verdict.RETEST); }

        private void add(Reason reason, boolean pass, boolean finish) {
            if (size == reasons.length) { // the oldest leaves
                perReason[reasons[next]]--;
                if (passed[next]) nPassed--;
                if (finished[next]) nFinished--;
            } else size++;
            reasons[next] = (byte) reason.ordinal();
            passed[next] = pass;
            finished[next] = finish;
            perReason[reasons[next]]++;
            if (passed[next]) nPassed++;
            if (finished[next]) nFinished++;
            next = (next + 1) % reasons.length;
        }

        int size() { return size; }

        /**
         * The presentations in the window, oldest first: their reason codes, and their outcomes as one letter each —
         * {@code p} passed, {@code f} finished and not passed, {@code r} a retest (not finished).
         */
        public record State(List<String> reasons, String outcomes) {
            public State {
                reasons = List.copyOf(reasons);
                if (outcomes.length() != reasons.size() || !outcomes.chars().allMatch(c -> c == 'p' || c == 'f' || c == 'r'))
                    throw new IllegalArgumentException("window: outcomes must be one of p, f, r per reason (" + reasons.size()
                            + " reasons, outcomes '" + (outcomes.length() > 40 ? outcomes.substring(0, 40) + "…" : outcomes) + "')");
            }
        }

        State state() {
            List<String> r = new ArrayList<>(size);
            StringBuilder o = new StringBuilder(size);
            Reason[] all = Reason.values();
            for (int k = 0, i = Math.floorMod(next - size, reasons.length); k < size; k++, i = (i + 1) % reasons.length) {
                r.add(all[reasons[i]].code());
                o.append(passed[i] ? 'p' : finished[i] ? 'f' : 'r');
            }
            return new State(r, o.toString());
        }

        /** Takes up {@code st} (the newest entries, if it holds more than this window does). */
        void restore(State st) {
            clear();
            for (int k = Math.max(0, st.reasons().size() - reasons.length); k < st.reasons().size(); k++) {
                char c = st.outcomes().charAt(k);
                add(Reason.parse(st.reasons().get(k)), c == 'p', c != 'r');
            }
        }

        double pct(Reason r) { return size == 0 ? 0 : 100.0 * perReason[r.ordinal()] / size; }

        View view() {
            int fault = 0;
            for (Reason r : Reason.values())
                if (r.rejectClass() == Reason.RejectClass.FAULT || r.rejectClass() == Reason.RejectClass.OVERLOAD) fault += perReason[r.ordinal()];
            double n = Math.max(1, size);
            return new View(size, nFinished == 0 ? Double.NaN : 100.0 * nPassed / nFinished, 100 * (size - nFinished) / n,
                    pct(Reason.OPEN_CONTACT), pct(Reason.SHORT), 100 * fault / n, pct(Reason.NEGATIVE_R));
        }
    }
}
