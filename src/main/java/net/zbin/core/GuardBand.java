package net.zbin.core;

/**
 * Guarded acceptance (ILAC-G8 / ISO 14253-1): acceptance limits are shrunk by {@code widthPct}
 * percentage points of nominal on each guarded edge, so a part read at the limit is not accepted
 * with up to 50 % risk. The width is given directly, or as the expanded uncertainty U (k = 2).
 *
 * @param widthPct shrink per edge in percent of nominal, ≥ 0
 * @param fromUncertainty true when the width was stated as the expanded uncertainty U
 */
public record GuardBand(double widthPct, boolean fromUncertainty) {
    public static final GuardBand NONE = new GuardBand(0, false);

    public GuardBand {
        if (!(widthPct >= 0) || !Double.isFinite(widthPct))
            throw new SpecException(fromUncertainty ? "guard_band.uncertainty_pct" : "guard_band.pct",
                    "must be >= 0 (was " + widthPct + ")");
    }

    public String key() { return fromUncertainty ? "guard_band.uncertainty_pct" : "guard_band.pct"; }
}
