package net.zbin.core;

/**
 * One value grade: a deviation window around nominal and the handler bin it sorts into. The limits are
 * held in percent of nominal; how the recipe stated them is kept too, so that a recipe edited to another
 * nominal (as {@code tune --vary nominal} does) gets the limits the edited file would have: an IEC 60062
 * letter is resolved again (absolute below 10 pF), limits stated as values stay those values, and limits
 * stated in percent stay in percent.
 *
 * @param name      label on the decision ("J", "A1", …)
 * @param bin       handler bin number
 * @param lowPct    lower deviation limit in percent of nominal (e.g. −5)
 * @param highPct   upper deviation limit in percent of nominal (e.g. +5)
 * @param letter    the tolerance letter the limits came from, or null
 * @param lowValue  the lower limit as a value in the part's unit when stated so (NaN otherwise)
 * @param highValue the upper limit as a value (NaN otherwise)
 */
public record Grade(String name, int bin, double lowPct, double highPct, ToleranceCode letter, double lowValue, double highValue) {
    /** Limits stated in percent of nominal. */
    public Grade(String name, int bin, double lowPct, double highPct) { this(name, bin, lowPct, highPct, null, Double.NaN, Double.NaN); }

    /** Limits from a tolerance letter at this nominal. */
    public static Grade ofLetter(String name, int bin, ToleranceCode code, PartType type, double nominal) {
        double[] l = code.limitsPct(type, nominal);
        return new Grade(name, bin, l[0], l[1], code, Double.NaN, Double.NaN);
    }

    /** Limits stated as values in the part's unit. */
    public static Grade ofValues(String name, int bin, double low, double high, double nominal) {
        return new Grade(name, bin, (low - nominal) / nominal * 100, (high - nominal) / nominal * 100, null, low, high);
    }

    /** The same grade in a recipe whose nominal is {@code nominal}, as the recipe file states it. */
    public Grade atNominal(PartType type, double nominal) {
        if (letter != null) return ofLetter(name, bin, letter, type, nominal);
        if (!Double.isNaN(lowValue)) return ofValues(name, bin, lowValue, highValue, nominal);
        return this;
    }

    /** Lowest accepted deviation in percent: the low limit pulled in by its guard. */
    public double acceptLowPct(GuardBand g) { return lowPct + g.atPct(lowPct); }

    /** Highest accepted deviation in percent: the high limit pulled in by its guard. */
    public double acceptHighPct(GuardBand g) { return highPct - g.atPct(highPct); }

    /** Whether a deviation is accepted; the window is closed: [low + guard, high − guard]. */
    public boolean accepts(double devPct, GuardBand g) {
        return devPct >= acceptLowPct(g) && devPct <= acceptHighPct(g);
    }
}
