package net.zbin.core;

/**
 * Mean and variance of a stream by Welford's update: numerically stable where the textbook
 * Σx² − (Σx)²/n loses every digit (values near 10⁷ with a spread of 0.1). Single owner, mutable;
 * O(1) memory.
 */
public final class RunningStats {
    private long n;
    private double mean, m2, min = Double.POSITIVE_INFINITY, max = Double.NEGATIVE_INFINITY;

    /** Adds one finite value; non-finite values are ignored. */
    public void add(double x) {
        if (!Double.isFinite(x)) return;
        n++;
        double d = x - mean;
        mean += d / n;
        m2 += d * (x - mean);
        min = Math.min(min, x);
        max = Math.max(max, x);
    }

    public long count() { return n; }

    /** NaN when empty. */
    public double mean() { return n == 0 ? Double.NaN : mean; }

    /** Sample variance (n − 1), NaN below two values. */
    public double variance() { return n < 2 ? Double.NaN : m2 / (n - 1); }

    /** Sample standard deviation, NaN below two values. */
    public double stdDev() { return Math.sqrt(variance()); }

    public double min() { return n == 0 ? Double.NaN : min; }

    public double max() { return n == 0 ? Double.NaN : max; }

    /** Everything the accumulator holds, to carry it across a restart. */
    public record State(long n, double mean, double m2, double min, double max) {}

    public State state() { return new State(n, mean, m2, min, max); }

    /** Takes up {@code s} as if the values behind it had been added here. */
    public void restore(State s) {
        n = s.n();
        mean = s.mean();
        m2 = s.m2();
        min = s.min();
        max = s.max();
    }

    public void reset() {
        n = 0;
        mean = m2 = 0;
        min = Double.POSITIVE_INFINITY;
        max = Double.NEGATIVE_INFINITY;
    }
}
