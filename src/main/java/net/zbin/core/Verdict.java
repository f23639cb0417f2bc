package net.zbin.core;

import java.util.Locale;

/** What the handler does with the part: keep it in a value bin, reject it, or present it again. */
public enum Verdict {
    PASS, FAIL, RETEST;

    private final String key = name().toLowerCase(Locale.ROOT); // once: keys are written per decision

    public String key() { return key; }
}
