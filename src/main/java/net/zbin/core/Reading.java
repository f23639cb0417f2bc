package net.zbin.core;

/**
 * A raw reading as the meter reported it, before compensation. R and X may be NaN or infinite
 * here: the meter said so, and grading turns that into a reason code instead of a value.
 *
 * @param freqHz frequency the meter measured at, in Hz
 * @param rOhm   raw resistive part in ohms
 * @param xOhm   raw reactive part in ohms
 * @param status the meter's status field
 */
public record Reading(double freqHz, double rOhm, double xOhm, MeterStatus status) {
    public Reading {
        if (!(freqHz > 0) || !Double.isFinite(freqHz))
            throw new IllegalArgumentException("freqHz must be > 0 (was " + freqHz + ")");
        if (status == null) throw new IllegalArgumentException("status is required");
    }

    public static Reading ok(Impedance z) { return new Reading(z.freqHz(), z.rOhm(), z.xOhm(), MeterStatus.OK); }

    public boolean isFinite() { return Double.isFinite(rOhm) && Double.isFinite(xOhm); }
}
