package net.zbin.core;

/**
 * IEC 60062 tolerance letters. For capacitors below 10 pF the letters B, C, D, F and G mean an
 * absolute tolerance in pF instead of a percentage.
 */
public enum ToleranceCode {
    B(0.1, 0.1, 0.1e-12), C(0.25, 0.25, 0.25e-12), D(0.5, 0.5, 0.5e-12), F(1, 1, 1e-12), G(2, 2, 2e-12),
    J(5, 5, Double.NaN), K(10, 10, Double.NaN), M(20, 20, Double.NaN), Z(20, 80, Double.NaN);

    /** Below this nominal (10 pF) the absolute form applies. */
    public static final double ABSOLUTE_BELOW_F = 10e-12;

    private final double minusPct;
    private final double plusPct;
    private final double absF;

    ToleranceCode(double minusPct, double plusPct, double absF) {
        this.minusPct = minusPct;
        this.plusPct = plusPct;
        this.absF = absF;
    }

    public double minusPct() { return minusPct; }
    public double plusPct() { return plusPct; }

    /** Absolute tolerance in farads for small capacitors, NaN where the letter has none. */
    public double absF() { return absF; }

    /**
     * Limits as deviation in percent of nominal, [low, high], taking the absolute form for a
     * capacitor under 10 pF.
     */
    public double[] limitsPct(PartType type, double nominal) {
        if (type == PartType.CAPACITOR && nominal < ABSOLUTE_BELOW_F && !Double.isNaN(absF)) {
            double pct = absF / nominal * 100;
            return new double[] {-pct, pct};
        }
        return new double[] {-minusPct, plusPct};
    }

    public static ToleranceCode parse(String s) {
        try {
            return valueOf(s.trim().toUpperCase(java.util.Locale.ROOT));
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException("unknown tolerance letter '" + s + "' (IEC 60062: B C D F G J K M Z)");
        }
    }
}
