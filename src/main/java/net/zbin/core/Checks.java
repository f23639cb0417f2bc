package net.zbin.core;

/** Argument checks whose messages name the field and the bound, e.g. "freqHz must be > 0 (was -5.0)". */
public final class Checks {
    private Checks() {}

    public static double finite(String field, double v) {
        if (!Double.isFinite(v)) throw new IllegalArgumentException(field + " must be a finite number (was " + v + ")");
        return v;
    }

    public static double positive(String field, double v) {
        finite(field, v);
        if (v <= 0) throw new IllegalArgumentException(field + " must be > 0 (was " + v + ")");
        return v;
    }



    public static <T> T present(String field, T v) {
        if (v == null) throw new IllegalArgumentException(field + " is required");
        return v;
    }
}
