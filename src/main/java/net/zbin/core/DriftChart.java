package net.zbin.core;

import java.util.List;

/**
 * Drift watch on one quantity of a lot: a baseline learned from the first parts, then EWMA and two-sided
 * CUSUM on the standardized means of subgroups of {@code subgroup} consecutive parts, with the limits of the
 * {@link ChartDesign} (so the false alarms of a stable line stay within the stated budget). A chart point is
 * standardized by the spread of the baseline's subgroup means — which holds variation between subgroups
 * (reels, temperature) as well as the parts' own — and never by less than σ/√n of the parts. The alarm
 * rises on the first signal of either chart and clears only when the quantity is back: {@code clearAfter}
 * parts without a signal and the mean of the points since the last signal within the CUSUM allowance k of
 * the baseline (a slow drift that keeps the charts restarting does not make the alarm flap). Single owner,
 * mutable; {@link #view} is the immutable figure for the dashboard.
 */
public final class DriftChart {
    private final MonitorSettings s;
    private final ChartDesign design;
    private final RunningStats baseline = new RunningStats(), baselineGroups = new RunningStats();
    private final EwmaChart ewma;
    private final CusumChart cusum;
    private final RunningStats group = new RunningStats();
    private final java.util.ArrayDeque<Double> lastGroups = new java.util.ArrayDeque<>();
    private double mu0 = Double.NaN, sigma0 = Double.NaN, sigmaPoint = Double.NaN;
    private boolean alarm;
    private int direction;
    private long quiet, signals, points, charted;
    private double zSinceSignal;
    private long nSinceSignal;

    /**
     * @param learning    true while the baseline is being learned
     * @param learned     parts learned so far
     * @param learnParts  parts the baseline is learned from
     * @param sigmaPoint  σ of a chart point (a subgroup mean) the charts standardize by
     * @param direction   +1 / −1 of the last signal while the alarm is active, 0 otherwise
     */
    public record View(boolean learning, long learned, long learnParts, double baselineMean, double baselineSigma, double sigmaPoint,
                       double ewma, double ewmaLimit, double cusumHigh, double cusumLow, double cusumH, boolean alarm, int direction,
                       long signals, double shift) {}

    public DriftChart(MonitorSettings s) { this(s, s.design()); }

    /** With the design already made for {@code s} (a monitor starting a lot reuses its own: no lookup at a lot change). */
    DriftChart(MonitorSettings s, ChartDesign design) {
        this.s = s;
        this.design = design;
        this.ewma = new EwmaChart(design.lambda(), design.limitL(), false);
        this.cusum = new CusumChart(design.k(), design.h());
    }

    /** Uses a known baseline (mean, σ of one part) instead of learning one. */
    public DriftChart(MonitorSettings s, double mean, double sigma) { this(s, s.design(), mean, sigma); }

    DriftChart(MonitorSettings s, ChartDesign design, double mean, double sigma) {
        this(s, design);
        if (!(sigma > 0)) throw new SpecException("monitor.sigma", "must be > 0 (was " + sigma + ")");
        mu0 = mean;
        sigma0 = sigma;
        sigmaPoint = sigma / Math.sqrt(s.subgroup());
    }

    /** Adds one value; returns +1/−1 when the alarm rises, 2 when it clears, 0 otherwise. */
    public int add(double x) {
        if (!Double.isFinite(x)) return 0;
        points++;
        if (Double.isNaN(mu0)) {
            learn(x);
            return 0;
        }
        group.add(x);
        if (group.count() < s.subgroup()) return quietPart();
        double mean = group.mean();
        group.reset();
        lastGroups.addLast(mean);
        if (lastGroups.size() > 4) lastGroups.removeFirst();
        charted++;
        double z = (mean - mu0) / sigmaPoint;
        zSinceSignal += z;
        nSinceSignal++;
        boolean e = ewma.add(z);
        int c = cusum.add(z);
        int dir = c != 0 ? c : e ? (z > 0 ? 1 : -1) : 0;
        if (dir != 0) {
            signals++;
            quiet = 0;
            zSinceSignal = 0;
            nSinceSignal = 0;
            if (!alarm) {
                alarm = true;
                direction = dir;
                return dir;
            }
            return 0;
        }
        quiet += s.subgroup() - 1;
        return quietPart();
    }

    private void learn(double x) {
        baseline.add(x);
        group.add(x);
        if (group.count() == s.subgroup()) {
            baselineGroups.add(group.mean());
            group.reset();
        }
        if (baseline.count() < s.learnParts()) return;
        group.reset();
        mu0 = baseline.mean();
        double floor = Math.max(Math.abs(mu0) * 1e-6, 1e-12);
        sigma0 = baseline.stdDev() > 0 ? baseline.stdDev() : floor;
        double within = sigma0 / Math.sqrt(s.subgroup());
        double between = s.subgroup() == 1 || baselineGroups.count() < 2 ? 0 : baselineGroups.stdDev();
        sigmaPoint = Math.max(within, between);
    }

    private int quietPart() {
        if (alarm && ++quiet >= s.clearAfter() && nSinceSignal > 0 && Math.abs(zSinceSignal / nSinceSignal) < Math.max(design.k(), 0.25)) {
            alarm = false;
            direction = 0;
            return 2;
        }
        return 0;
    }

    /** The mean of the last (up to four) subgroups minus the baseline: the shift now, in the quantity's unit. */
    public double shift() {
        if (lastGroups.isEmpty() || Double.isNaN(mu0)) return Double.NaN;
        return lastGroups.stream().mapToDouble(Double::doubleValue).average().orElse(Double.NaN) - mu0;
    }

    /** Standard error of {@link #shift()}. */
    public double shiftError() {
        return lastGroups.isEmpty() ? Double.NaN : sigmaPoint / Math.sqrt(lastGroups.size());
    }

    /**
     * Everything the chart holds, to carry it across a restart of the daemon (the settings and design are not in it:
     * they come from the recipe the chart is restored under).
     */
    public record State(RunningStats.State baseline, RunningStats.State baselineGroups, RunningStats.State group, double ewma,
                        long ewmaPoints, double cusumHigh, double cusumLow, List<Double> lastGroups, double mu0, double sigma0,
                        double sigmaPoint, boolean alarm, int direction, long quiet, long signals, long points, long charted,
                        double zSinceSignal, long nSinceSignal) {
        public State {
            lastGroups = List.copyOf(lastGroups);
        }
    }

    public State state() {
        return new State(baseline.state(), baselineGroups.state(), group.state(), ewma.statistic(), ewma.points(), cusum.upper(),
                cusum.lower(), List.copyOf(lastGroups), mu0, sigma0, sigmaPoint, alarm, direction, quiet, signals, points, charted,
                zSinceSignal, nSinceSignal);
    }

    /** Takes up {@code st}, a {@link #state()} of a chart under the same settings. */
    public void restore(State st) {
        baseline.restore(st.baseline());
        baselineGroups.restore(st.baselineGroups());
        group.restore(st.group());
        ewma.restore(st.ewma(), st.ewmaPoints());
        cusum.restore(st.cusumHigh(), st.cusumLow());
        lastGroups.clear();
        lastGroups.addAll(st.lastGroups());
        mu0 = st.mu0();
        sigma0 = st.sigma0();
        sigmaPoint = st.sigmaPoint();
        alarm = st.alarm();
        direction = st.direction();
        quiet = st.quiet();
        signals = st.signals();
        points = st.points();
        charted = st.charted();
        zSinceSignal = st.zSinceSignal();
        nSinceSignal = st.nSinceSignal();
    }

    public boolean alarm() { return alarm; }

    /** Chart points so far (after the baseline). */
    public long charted() { return charted; }

    public boolean learning() { return Double.isNaN(mu0); }

    public double baselineMean() { return mu0; }

    /** σ of one part in the baseline. */
    public double baselineSigma() { return sigma0; }

    public View view() {
        return new View(Double.isNaN(mu0), baseline.count(), s.learnParts(), mu0, sigma0, sigmaPoint, ewma.statistic(), ewma.limit(),
                cusum.upper(), cusum.lower(), cusum.h(), alarm, direction, signals, shift());
    }
}
