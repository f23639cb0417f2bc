package net.zbin.core;

/**
 * Guarded acceptance (ILAC-G8:09/2019, ISO 14253-1): every acceptance limit is pulled inwards by the
 * expected uncertainty at that limit, so a part read at the limit is not accepted with up to 50 % risk.
 * The uncertainty is stated as a percentage of reading, so the guard at a limit L is
 * {@code widthPct} % of L itself, not of the nominal (JCGM 106:2012): a −20/+80 % grade with U = 1 %
 * accepts −19.2 % … +78.2 %.
 *
 * <p>U of one reading has a repeatability part, which averaging n readings divides by √n, and a systematic part
 * (calibration, fixture), which it does not: U(n) = √(U² − U_r² + U_r²/n) (JCGM 100:2008 5.1.2, uncorrelated
 * components combined in quadrature; 4.2.3, the standard deviation of a mean of n observations is s/√n).
 *
 * @param widthPct         guard per edge in percent of the limit value, ≥ 0 (U of one reading when from an uncertainty)
 * @param fromUncertainty  true when it was stated as the expanded uncertainty U (k = 2), w = U
 * @param repeatabilityPct the repeatability part U_r of U in % of reading, 0 ≤ U_r ≤ U (0: all systematic)
 */
public record GuardBand(double widthPct, boolean fromUncertainty, double repeatabilityPct) {
    public static final GuardBand NONE = new GuardBand(0, false);

    public GuardBand {
        if (!(widthPct >= 0) || !Double.isFinite(widthPct) || widthPct >= 100)
            throw new SpecException(fromUncertainty ? "guard_band.uncertainty_pct" : "guard_band.pct",
                    "must be >= 0 and < 100 (was " + widthPct + ")");
        if (!(repeatabilityPct >= 0) || repeatabilityPct > widthPct)
            throw new SpecException("guard_band.repeatability_pct", "must be >= 0 and <= uncertainty_pct " + widthPct + " (was " + repeatabilityPct + ")");
        if (repeatabilityPct > 0 && !fromUncertainty)
            throw new SpecException("guard_band.repeatability_pct", "splits an uncertainty: give guard_band.uncertainty_pct, not pct");
    }

    /** A guard band with no repeatability part stated. */
    public GuardBand(double widthPct, boolean fromUncertainty) { this(widthPct, fromUncertainty, 0); }

    /** U of the mean of n readings (n ≥ 1): only the repeatability part shrinks, by √n. */
    public double uncertaintyPct(int n) {
        if (n < 1) throw new IllegalArgumentException("readings must be >= 1 (was " + n + ")");
        if (n == 1 || repeatabilityPct == 0) return widthPct;
        double sys2 = Math.max(0, widthPct * widthPct - repeatabilityPct * repeatabilityPct);
        return Math.sqrt(sys2 + repeatabilityPct * repeatabilityPct / n);
    }

    /** The guard band a decision on the mean of n readings is judged with. */
    public GuardBand forReadings(int n) {
        return n == 1 || repeatabilityPct == 0 ? this : new GuardBand(uncertaintyPct(n), true, Math.min(uncertaintyPct(n), repeatabilityPct / Math.sqrt(n)));
    }

    public String key() { return fromUncertainty ? "guard_band.uncertainty_pct" : "guard_band.pct"; }

    /**
     * The guard at a limit given as deviation from nominal in percent, in percentage points of
     * nominal: w × (1 + limit/100).
     */
    public double atPct(double limitPct) { return widthPct * (1 + limitPct / 100); }
}
