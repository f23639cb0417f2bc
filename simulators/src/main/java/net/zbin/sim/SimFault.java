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
    SLOW;

    public static SimFault parse(String s) { return valueOf(s.trim().toUpperCase(Locale.ROOT)); }
}
