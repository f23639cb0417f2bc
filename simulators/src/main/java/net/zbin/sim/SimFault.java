package net.zbin.sim;

import java.util.Locale;

/** Faults the simulated meter can be told to produce on its next measurements. */
public enum SimFault {
    /** Swallow the query: the client times out. */
    TIMEOUT,
    /** Answer with bytes that are not a reading. */
    GARBAGE,
    /** Close the connection. */
    DISCONNECT,
    /** Report overload in the status field. */
    OVERLOAD,
    /** Report an instrument error and queue an error message. */
    ERROR,
    /** Answer, but only after {@link SimMeter#SLOW_MS}: the client times out, then the late reply arrives. */
    SLOW,
    /** Answer, then send one more complete line that answers nothing (a copy of the reading, as a meter repeating itself). */
    STRAY,
    /**
     * Swallow the query, then send its reply {@link SimMeter#LATE_MS} later on its own, while the meter goes on
     * answering other commands: the client times out, and the late line lands in the middle of later exchanges.
     */
    LATE;

    public static SimFault parse(String s) { return valueOf(s.trim().toUpperCase(Locale.ROOT)); }
}
