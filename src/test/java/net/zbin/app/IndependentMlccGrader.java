package net.zbin.app;

/**
 * A second, deliberately plain implementation of the shipped mlcc-x7r-100n recipe (nested J/K/M at
 * ±5/10/20 % with U = 0.3 %, Cs primary, D ≤ 0.025, open above 10× and short below 0.01× the ideal
 * |Z|, one retest), written from the recipe text and not from the grader, to check it from outside.
 */
final class IndependentMlccGrader {
    private IndependentMlccGrader() {}

    static final double NOMINAL = 100e-9, F = 1000, W = 2 * Math.PI * F;

    /** The bin for a compensated (r, x) at attempt 0. */
    static int bin(double r, double x) { return bin(r, x, 0); }

    /** The bin for a compensated (r, x) at a given attempt (0 = first presentation). */
    static int bin(double r, double x, int attempt) {
        double ideal = 1 / (W * NOMINAL);
        double z = Math.sqrt(r * r + x * x);
        boolean retest = attempt < 1;
        // Open contact: the reactance far above the part's (or the fixture's own stray range); retest once, then bin 10.
        if (Math.abs(x) > 10 * ideal || z >= 1 / Math.hypot(1e-6, W * 20e-12)) return retest ? 0 : 10;
        if (z < 0.01 * ideal || z <= 2) return retest ? 0 : 10; // short: retest once, then the short bin (10 too)
        if (r < -0.001 * z) return retest ? 0 : 11;            // R below zero beyond the D resolution: stale compensation
        double cs = -1 / (W * x);
        if (cs <= 0) return 7;
        if (r / Math.abs(x) > 0.025) return 9;                  // D gate (covers the D ≤ 1 plausibility too)
        double dev = (cs - NOMINAL) / NOMINAL * 100, u = 0.3;   // guard = U × the limit value (ILAC-G8, % of reading)
        if (dev >= -5 + u * 0.95 && dev <= 5 - u * 1.05) return 1;
        if (dev >= -10 + u * 0.90 && dev <= 10 - u * 1.10) return 2;
        if (dev >= -20 + u * 0.80 && dev <= 20 - u * 1.20) return 3;
        return dev < 0 ? 7 : 8;
    }
}
