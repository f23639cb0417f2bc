package net.zbin.io.meter;

import net.zbin.core.TestConditions;

/** A conversation with one meter. Not thread-safe: one owner measures one part at a time. */
public interface MeterSession extends AutoCloseable {
    /** The meter's identification string. */
    String identify() throws MeterException;

    /** Sets the test conditions; sends nothing when they are already in force. */
    void apply(TestConditions conditions) throws MeterException;

    /** One reading at the conditions last applied. */
    MeterReading measure() throws MeterException;

    /**
     * The longest one {@link #measure()} can block on a meter that was answering before and then stops, ms: it fails
     * with a timeout by then. {@link Long#MAX_VALUE} when not known. The daemon runs a part on its MQTT client's thread
     * only when this is well inside the broker's keep-alive.
     */
    default long longestReadingMs() { return Long.MAX_VALUE; }

    /** Reconnects performed so far (for monitoring and tests). */
    long reconnects();

    /** Bytes the meter sent that answered no query (dropped before a query), for monitoring and tests. */
    long unaskedBytes();

    @Override
    void close();
}
