package net.zbin.core;

import java.util.Locale;

/** Series or parallel equivalent circuit. */
public enum EquivalentModel {
    SERIES, PARALLEL;

    private final String key = name().toLowerCase(Locale.ROOT); // once: keys are written per decision

    public String key() { return key; }
}
