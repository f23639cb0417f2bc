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
    public boolean contains(double devPct, double lowGuardPct, double highGuardPct) {
        return devPct >= lowPct + lowGuardPct && devPct <= highPct - highGuardPct;
    }

    public double halfWidthPct() { return (highPct - lowPct) / 2; }
}
