package net.zbin.core;

import java.util.Locale;

/** Where compensation data came from: none applied, the meter's own, or captured by zbin. */
public enum CompensationSource {
    NONE, FACTORY, USER;

    private static final CompensationSource[] ALL = values();
    /** Made once: every record row and decision writes it and every read-back row reads it. */
    private final String key = name().toLowerCase(Locale.ROOT);

    public String key() { return key; }

    public static CompensationSource parse(String s) {
        for (CompensationSource c : ALL) if (c.key.equalsIgnoreCase(s)) return c;
        throw new IllegalArgumentException("unknown compensation source '" + s + "' (expected none, factory or user)");
    }
}
