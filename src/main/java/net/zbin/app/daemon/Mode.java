package net.zbin.app.daemon;

import java.util.Locale;

/** The line's mode as published on the state topic. */
public enum Mode {
    READY, PAUSED, FAULT, OFFLINE;

    public String key() { return name().toLowerCase(Locale.ROOT); }
}
