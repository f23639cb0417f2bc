package net.zbin.core;

/**
 * Refusals of numbers that are valid but cannot be what was meant — a test frequency in millihertz, a fixture's
 * stray limit in farads, a loss limit of ten — with the value the writer most likely meant, in the form to
 * write it. A number still means what it says: nothing here changes a value, it only refuses one.
 */
public final class Plausible {
    private Plausible() {}

    /** A frequency below 1 Hz: an SI {@code m} (milli) written for {@code M} (mega) is the usual slip. */
    public static void frequency(String key, double hz) {
        if (hz >= 1) return;
        String hint = hz >= 1e-9 ? "; did you mean " + SiValue.compact(hz * 1e9, "Hz") + " (`" + SiValue.compact(hz * 1e9) + "`)? "
                + "An SI `m` is milli, `M` is mega" : "";
        throw new SpecException(key, "must be at least 1 Hz for an impedance test (was " + SiValue.compact(hz, "Hz") + ")" + hint);
    }

    /**
     * A fixture limit beyond what any fixture reads; a plain number ≥ 1 was most likely meant in the small unit
     * the trade uses for it (pF for stray, mΩ for a short).
     */
    public static void atMost(String key, double v, double max, String unit, String why, double smallUnit, String smallName) {
        if (v <= max) return;
        String hint = v >= 1 ? "; a plain number is in " + unit + ": did you mean " + SiValue.compact(v * smallUnit, unit) + " (`"
                + SiValue.compact(v * smallUnit) + "`, " + smallName + ")?" : "";
        throw new SpecException(key, "must be at most " + SiValue.compact(max, unit) + ": " + why + " (was " + SiValue.compact(v, unit) + ")" + hint);
    }

    /** A dissipation factor limit above 1: a capacitor or inductor past θ = ±45°; a percentage written as a ratio is the usual slip. */
    public static void dissipation(String key, double d) {
        if (d <= 1) return;
        throw new SpecException(key, "must be at most 1 (was " + SiValue.plain(d) + "): D is a ratio, and a capacitor or inductor with D above 1 "
                + "is refused as phase-implausible anyway; did you mean " + SiValue.plain(d) + " % (`" + SiValue.plain(d / 100) + "`)?");
    }
}
