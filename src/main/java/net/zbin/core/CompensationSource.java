package net.zbin.core;

import java.util.Locale;

/** Where compensation data came from: none applied, the meter's own, or captured by zbin. */
public enum CompensationSource {
    NONE, FACTORY, USER;

    public String key() { return name().toLowerCase(Locale.ROOT); }

    public static CompensationSource parse(String s) {
        for (CompensationSource c : values()) if (c.key().equalsIgnoreCase(s)) return c;
        throw new IllegalArgumentException("unknown compensation source '" + s + "' (expected none, factory or user)");
    }
}
