package net.zbin.core;

/**
 * Guarded acceptance (ILAC-G8:09/2019, ISO 14253-1): every acceptance limit is pulled inwards by the
 * expected uncertainty at that limit, so a part read at the limit is not accepted with up to 50 % risk.
 * The uncertainty is stated as a percentage of reading, so the guard at a limit L is
 * {@code widthPct} % of L itself, not of the nominal (JCGM 106:2012): a −20/+80 % grade with U = 1 %
 * accepts −19.2 % … +78.2 %.
 *
 * @param widthPct        guard per edge in percent of the limit value, ≥ 0
 * @param fromUncertainty true when it was stated as the expanded uncertainty U (k = 2), w = U
 */
public record GuardBand(double widthPct, boolean fromUncertainty) {
    public static final GuardBand NONE = new GuardBand(0, false);

    public GuardBand {
        if (!(widthPct >= 0) || !Double.isFinite(widthPct) || widthPct >= 100)
            throw new SpecException(fromUncertainty ? "guard_band.uncertainty_pct" : "guard_band.pct",
                    "must be >= 0 and < 100 (was " + widthPct + ")");
    }

    public String key() { return fromUncertainty ? "guard_band.uncertainty_pct" : "guard_band.pct"; }

    /**
     * The guard at a limit given as deviation from nominal in percent, in percentage points of
     * nominal: w × (1 + limit/100).
     */
    public double atPct(double limitPct) { return widthPct * (1 + limitPct / 100); }
}
