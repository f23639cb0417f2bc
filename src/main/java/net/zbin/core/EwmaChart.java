package net.zbin.core;

/**
 * EWMA chart on a standardized variable (in-control mean 0, σ 1), with the exact time-varying limits
 * ±L·√(λ/(2−λ)·(1−(1−λ)^{2i})) (Lucas & Saccucci 1990), so early points are not held to the asymptotic
 * limit. Zero start; after a signal it starts again from zero. Single owner, mutable.
 *
 * @see #arlNote() for the in-control average run length the defaults imply
 */
public final class EwmaChart {
    private final double lambda, limitL;
    private final boolean exact;
    private double z;
    private long i;

    /**
     * @param lambda weight of the newest point, 0 &lt; λ ≤ 1
     * @param limitL width of the limits in σ of the statistic, &gt; 0
     */
    public EwmaChart(double lambda, double limitL) { this(lambda, limitL, true); }

    /** @param exact false: the asymptotic limit ±L·√(λ/(2−λ)) from the first point, as the published ARL tables use */
    public EwmaChart(double lambda, double limitL, boolean exact) {
        this.exact = exact;
        if (!(lambda > 0 && lambda <= 1)) throw new SpecException("monitor.ewma_lambda", "must be > 0 and <= 1 (was " + lambda + ")");
        if (!(limitL > 0) || !Double.isFinite(limitL)) throw new SpecException("monitor.ewma_l", "must be > 0 (was " + limitL + ")");
        this.lambda = lambda;
        this.limitL = limitL;
    }

    /** Adds one standardized point; true when the chart signals (then it restarts). */
    public boolean add(double x) {
        i++;
        z = lambda * x + (1 - lambda) * z;
        boolean signal = Math.abs(z) > limit();
        if (signal) restart();
        return signal;
    }

    /** The current limit, exact for the number of points so far. */
    public double limit() {
        double f = exact ? 1 - Math.pow(1 - lambda, 2.0 * Math.max(1, i)) : 1;
        return limitL * Math.sqrt(lambda / (2 - lambda) * f);
    }

    public double statistic() { return z; }

    public long points() { return i; }

    /** Takes up the {@link #statistic()} and {@link #points()} of a chart with the same λ and L (a restart of the daemon). */
    public void restore(double z, long points) {
        this.z = z;
        this.i = points;
    }

    public void restart() {
        z = 0;
        i = 0;
    }

    /** The in-control ARL of the defaults, for people. */
    public static String arlNote() { return "λ 0.10, L 2.814: in-control ARL 500 (Lucas & Saccucci 1990)"; }
}
