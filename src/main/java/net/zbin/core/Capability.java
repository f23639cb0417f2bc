package net.zbin.core;

/**
 * Process capability against two-sided specification limits (textbook definitions):
 * Cp = (USL − LSL) / 6σ, Cpk = min(USL − μ, μ − LSL) / 3σ.
 */
public final class Capability {
    private Capability() {}

    /** NaN when σ is not a positive number. */
    public static double cp(double lsl, double usl, double sigma) {
        return sigma > 0 ? (usl - lsl) / (6 * sigma) : Double.NaN;
    }

    /** NaN when σ is not a positive number. */
    public static double cpk(double lsl, double usl, double mean, double sigma) {
        return sigma > 0 ? Math.min(usl - mean, mean - lsl) / (3 * sigma) : Double.NaN;
    }
}
