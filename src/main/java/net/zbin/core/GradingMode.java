package net.zbin.core;

import java.util.Locale;

/**
 * CONCENTRIC: tolerance windows centred on the nominal, each containing the one before, tightest
 * first; the first that accepts the part wins. LADDER: adjacent value ranges, low to high; the one the
 * part falls in wins.
 */
public enum GradingMode {
    CONCENTRIC, LADDER;

    public String key() { return name().toLowerCase(Locale.ROOT); }

    public static GradingMode parse(String s) {
        String t = s.trim().toLowerCase(Locale.ROOT);
        for (GradingMode m : values()) if (m.key().equals(t)) return m;
        if (t.equals("nested")) throw new IllegalArgumentException("'nested' is now called 'concentric' (tolerance windows centred on the nominal)");
        if (t.equals("sequential")) throw new IllegalArgumentException("'sequential' is now called 'ladder' (adjacent value ranges, low to high)");
        throw new IllegalArgumentException("must be concentric or ladder (was '" + s + "')");
    }
}
