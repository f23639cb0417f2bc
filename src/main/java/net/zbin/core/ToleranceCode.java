package net.zbin.core;

import java.util.Arrays;
import java.util.Locale;
import java.util.stream.Collectors;

/**
 * IEC 60062 tolerance letters, symmetric and asymmetric. For capacitors below 10 pF the letters B, C,
 * D, F and G mean an absolute tolerance in pF instead of a percentage.
 */
public enum ToleranceCode {
    E(0.005, 0.005, Double.NaN), L(0.01, 0.01, Double.NaN), P(0.02, 0.02, Double.NaN), W(0.05, 0.05, Double.NaN),
    B(0.1, 0.1, 0.1e-12), C(0.25, 0.25, 0.25e-12), D(0.5, 0.5, 0.5e-12), F(1, 1, 1e-12), G(2, 2, 2e-12),
    J(5, 5, Double.NaN), K(10, 10, Double.NaN), M(20, 20, Double.NaN), N(30, 30, Double.NaN),
    Q(10, 30, Double.NaN), T(10, 50, Double.NaN), S(20, 50, Double.NaN), Z(20, 80, Double.NaN);

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

    /** The letters as a list for people: "E L P W B C D F G J K M N Q T S Z". */
    public static String letters() {
        return Arrays.stream(values()).map(Enum::name).collect(Collectors.joining(" "));
    }

    public static ToleranceCode parse(String s) {
        String t = s.trim();
        if (t.length() == 1) {
            for (ToleranceCode c : values()) if (c.name().equals(t.toUpperCase(Locale.ROOT))) return c;
        }
        throw new IllegalArgumentException("unknown tolerance letter '" + s + "' (IEC 60062 letters: " + letters()
                + "; for other limits give pct or low_pct/high_pct)");
    }
}
