package net.zbin.core;

import java.util.Locale;

/** Series or parallel equivalent circuit. */
public enum EquivalentModel {
    SERIES, PARALLEL;

    public String key() { return name().toLowerCase(Locale.ROOT); }
}
