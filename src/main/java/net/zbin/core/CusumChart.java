package net.zbin.core;

/**
 * Two-sided tabular CUSUM on a standardized variable (in-control mean 0, σ 1): S⁺ = max(0, S⁺ + x − k),
 * S⁻ = max(0, S⁻ − x − k), a signal when either exceeds h (Lucas & Crosier 1982 with zero start).
 * After a signal both sums start again from zero. Single owner, mutable.
 */
public final class CusumChart {
    private final double k, h;
    private double hi, lo;

    /**
     * @param k reference value (allowance) in σ, ≥ 0 — half the shift to detect fastest
     * @param h decision interval in σ, &gt; 0
     */
    public CusumChart(double k, double h) {
        if (!(k >= 0) || !Double.isFinite(k)) throw new SpecException("monitor.cusum_k", "must be >= 0 (was " + k + ")");
        if (!(h > 0) || !Double.isFinite(h)) throw new SpecException("monitor.cusum_h", "must be > 0 (was " + h + ")");
        this.k = k;
        this.h = h;
    }

    /** Adds one standardized point; +1 for an upward signal, −1 downward, 0 none (a signal restarts it). */
    public int add(double x) {
        hi = Math.max(0, hi + x - k);
        lo = Math.max(0, lo - x - k);
        int s = hi > h ? 1 : lo > h ? -1 : 0;
        if (s != 0) restart();
        return s;
    }

    public double upper() { return hi; }

    public double lower() { return lo; }

    public double h() { return h; }

    /** Takes up the sums of a chart with the same k and h (see {@link #upper()}, {@link #lower()}). */
    public void restore(double upper, double lower) {
        hi = upper;
        lo = lower;
    }

    public void restart() {
        hi = 0;
        lo = 0;
    }
}
