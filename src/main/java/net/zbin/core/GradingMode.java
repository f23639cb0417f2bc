package net.zbin.core;

import java.util.Locale;

/**
 * CONCENTRIC: tolerance windows centred on the nominal, each containing the one before, tightest
 * first; the first that accepts the part wins. LADDER: adjacent value ranges, low to high; the one the
 * part falls in wins.
 */
public enum GradingMode {
    CONCENTRIC, LADDER;

    private final String key = name().toLowerCase(Locale.ROOT); // once: keys are written per decision

    public String key() { return key; }

    public static GradingMode parse(String s) {
        String t = s.trim().toLowerCase(Locale.ROOT);
        for (GradingMode m : values()) if (m.key().equals(t)) return m;
        throw new IllegalArgumentException("must be one of: concentric (tolerance windows centred on the nominal, tightest first), "
                + "ladder (adjacent value ranges, low to high) (was '" + s + "')");
    }
}
