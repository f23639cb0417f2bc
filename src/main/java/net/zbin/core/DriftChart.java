package net.zbin.core;

/**
 * Drift watch on one quantity of a lot: a baseline (mean, σ per part) learned from the first parts with
 * Welford's update, then EWMA and two-sided CUSUM on the standardized means of subgroups of
 * {@code subgroup} consecutive parts (σ/√n), so a false alarm is rare in parts, not just in points. The
 * alarm rises on the first signal of either chart and clears after {@code clearAfter} parts without one
 * (hysteresis). Single owner, mutable; {@link #view} is the immutable figure for the dashboard.
 */
public final class DriftChart {
    private final MonitorSettings s;
    private final RunningStats baseline = new RunningStats();
    private final EwmaChart ewma;
    private final CusumChart cusum;
    private final RunningStats group = new RunningStats();
    private final java.util.ArrayDeque<Double> lastGroups = new java.util.ArrayDeque<>();
    private double mu0 = Double.NaN, sigma0 = Double.NaN;
    private boolean alarm;
    private int direction;
    private long quiet, signals, points;

    /**
     * @param learning  true while the baseline is being learned
     * @param direction +1 / −1 of the last signal while the alarm is active, 0 otherwise
     */
    public record View(boolean learning, long learned, double baselineMean, double baselineSigma, double ewma, double ewmaLimit,
                       double cusumHigh, double cusumLow, double cusumH, boolean alarm, int direction, long signals, double shift) {}

    public DriftChart(MonitorSettings s) {
        this.s = s;
        this.ewma = new EwmaChart(s.ewmaLambda(), s.ewmaL());
        this.cusum = new CusumChart(s.cusumK(), s.cusumH());
    }

    /** Uses a known baseline instead of learning one. */
    public DriftChart(MonitorSettings s, double mean, double sigma) {
        this(s);
        if (!(sigma > 0)) throw new SpecException("monitor.sigma", "must be > 0 (was " + sigma + ")");
        mu0 = mean;
        sigma0 = sigma;
    }

    /** Adds one value; returns +1/−1 when the alarm rises, 2 when it clears, 0 otherwise. */
    public int add(double x) {
        if (!Double.isFinite(x)) return 0;
        points++;
        if (Double.isNaN(mu0)) {
            baseline.add(x);
            if (baseline.count() >= s.learnParts()) {
                mu0 = baseline.mean();
                sigma0 = baseline.stdDev() > 0 ? baseline.stdDev() : Math.max(Math.abs(mu0) * 1e-6, 1e-12);
            }
            return 0;
        }
        group.add(x);
        if (group.count() < s.subgroup()) return quietPart();
        double mean = group.mean();
        group.reset();
        lastGroups.addLast(mean);
        if (lastGroups.size() > 4) lastGroups.removeFirst();
        double z = (mean - mu0) / (sigma0 / Math.sqrt(s.subgroup()));
        boolean e = ewma.add(z);
        int c = cusum.add(z);
        int dir = c != 0 ? c : e ? (z > 0 ? 1 : -1) : 0;
        if (dir != 0) {
            signals++;
            quiet = 0;
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

    private int quietPart() {
        if (alarm && ++quiet >= s.clearAfter()) {
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
        return lastGroups.isEmpty() ? Double.NaN : sigma0 / Math.sqrt((double) s.subgroup() * lastGroups.size());
    }

    public boolean alarm() { return alarm; }

    public double baselineMean() { return mu0; }

    public double baselineSigma() { return sigma0; }

    public View view() {
        return new View(Double.isNaN(mu0), baseline.count(), mu0, sigma0, ewma.statistic(), ewma.limit(), cusum.upper(), cusum.lower(),
                cusum.h(), alarm, direction, signals, shift());
    }
}
