package net.zbin.io.meter;

import net.zbin.core.Reading;

/**
 * One reading from the meter and how long the exchange took.
 *
 * @param reading   raw R/X at the set frequency, with the meter's status
 * @param elapsedMs query sent to reply parsed, in milliseconds
 */
public record MeterReading(Reading reading, double elapsedMs) {}
