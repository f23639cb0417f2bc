package net.zbin.app.daemon;

import java.util.Locale;

/** The line's mode as published on the state topic. */
public enum Mode {
    READY, PAUSED, FAULT, OFFLINE;

    private final String key = name().toLowerCase(Locale.ROOT); // once, as the core's enums do

    public String key() { return key; }
}
