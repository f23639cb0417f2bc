package net.zbin.core;

/**
 * One value grade: a deviation window around nominal and the handler bin it sorts into.
 *
 * @param name    label on the decision ("J", "A1", …)
 * @param bin     handler bin number
 * @param lowPct  lower deviation limit in percent of nominal (e.g. −5)
 * @param highPct upper deviation limit in percent of nominal (e.g. +5)
 */
public record Grade(String name, int bin, double lowPct, double highPct) {
    /** Lowest accepted deviation in percent: the low limit pulled in by its guard. */
    public double acceptLowPct(GuardBand g) { return lowPct + g.atPct(lowPct); }

    /** Highest accepted deviation in percent: the high limit pulled in by its guard. */
    public double acceptHighPct(GuardBand g) { return highPct - g.atPct(highPct); }

    /** Whether a deviation is accepted; the window is closed: [low + guard, high − guard]. */
    public boolean accepts(double devPct, GuardBand g) {
        return devPct >= acceptLowPct(g) && devPct <= acceptHighPct(g);
    }
}
