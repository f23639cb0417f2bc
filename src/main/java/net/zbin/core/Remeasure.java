package net.zbin.core;

/**
 * Re-measuring near a limit: a part whose value reads within {@code nearPct} percentage points of an acceptance
 * limit (inside a guard zone included) is measured again, up to {@code maxReadings} readings in all, and decided on
 * the mean with the uncertainty of a mean ({@link GuardBand#forReadings}). Only while the handler's deadline leaves
 * time for another reading.
 *
 * @param maxReadings readings of one part at most; 1 = off
 * @param nearPct     how close to an acceptance limit, in percentage points of nominal, calls for another reading
 */
public record Remeasure(int maxReadings, double nearPct) {
    public static final Remeasure OFF = new Remeasure(1, 0);

    public Remeasure {
        if (maxReadings < 1 || maxReadings > 16) throw new SpecException("remeasure.max_readings", "must be 1..16 (was " + maxReadings + ")");
        if (!(nearPct >= 0) || !Double.isFinite(nearPct)) throw new SpecException("remeasure.near_pct", "must be >= 0 (was " + nearPct + ")");
        if (maxReadings > 1 && nearPct == 0) throw new SpecException("remeasure.near_pct", "must be > 0 when max_readings is above 1");
    }

    public boolean on() { return maxReadings > 1; }
}
