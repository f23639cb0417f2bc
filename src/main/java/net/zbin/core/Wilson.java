package net.zbin.core;

/** Wilson score interval for a proportion (Newcombe 1998): honest at small n and near 0 or 1. */
public final class Wilson {
    private Wilson() {}

    /** z for a two-sided 95 % interval. */
    public static final double Z95 = 1.959963984540054;

    /** [low, high] of the proportion successes/n, or [NaN, NaN] when n is 0. */
    public static double[] interval(long successes, long n, double z) {
        if (n <= 0) return new double[] {Double.NaN, Double.NaN};
        if (successes < 0 || successes > n) throw new IllegalArgumentException("successes must be 0..n (was " + successes + " of " + n + ")");
        double p = (double) successes / n, z2 = z * z;
        double centre = (p + z2 / (2 * n)) / (1 + z2 / n);
        double half = z / (1 + z2 / n) * Math.sqrt(p * (1 - p) / n + z2 / (4.0 * n * n));
        return new double[] {Math.max(0, centre - half), Math.min(1, centre + half)};
    }
}
