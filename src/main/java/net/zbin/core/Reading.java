package net.zbin.core;

/**
 * A raw reading as the meter reported it, before compensation. R and X may be NaN or infinite
 * here: the meter said so, and grading turns that into a reason code instead of a value. A meter
 * that reports overload or an error gives no reading at all (a {@link FaultKind} instead).
 *
 * @param freqHz frequency the meter measured at, in Hz
 * @param rOhm   raw resistive part in ohms
 * @param xOhm   raw reactive part in ohms
 */
public record Reading(double freqHz, double rOhm, double xOhm) {
    public Reading {
        if (!(freqHz > 0) || !Double.isFinite(freqHz))
            throw new IllegalArgumentException("freqHz must be > 0 (was " + freqHz + ")");
        rOhm += 0.0; // −0 is 0
        xOhm += 0.0;
    }

    public static Reading of(Impedance z) { return new Reading(z.freqHz(), z.rOhm(), z.xOhm()); }

    public boolean isFinite() { return Double.isFinite(rOhm) && Double.isFinite(xOhm); }
}
