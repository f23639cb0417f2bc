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
        if (z > 10 * ideal) return attempt < 1 ? 0 : 10;  // open contact: retest once, then the contact bin
        if (z < 0.01 * ideal) return attempt < 1 ? 0 : 10; // short: retest once, then the short bin (10 too)
        double cs = -1 / (W * x);
        if (cs <= 0) return 7;
        if (r / Math.abs(x) > 0.025) return 9;
        double dev = (cs - NOMINAL) / NOMINAL * 100, u = 0.3;
        if (Math.abs(dev) <= 5 - u) return 1;
        if (Math.abs(dev) <= 10 - u) return 2;
        if (Math.abs(dev) <= 20 - u) return 3;
        return dev < 0 ? 7 : 8;
    }
}
