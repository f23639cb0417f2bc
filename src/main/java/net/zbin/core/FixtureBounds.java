package net.zbin.core;

/**
 * What the fixture itself can read, so that a reading of the empty contacts or of the short bar is
 * never graded as a part. Without compensation the fixture's open may be anything up to
 * {@code openMaxF} of stray capacitance (and {@code openMaxGS} of leakage) and its short anything up to
 * {@code shortMaxOhm}; with compensation a reading within {@code openBandF} of the stored open, or
 * {@code shortBandOhm} of the stored short, is the fixture.
 *
 * <p>Defaults are the line config's {@code fixture} defaults (common practice for a bench fixture and
 * clip leads): 20 pF, 1 µS, 2 Ω; 0.5 pF and 50 mΩ around the stored open and short; D resolution 0.001.
 *
 * @param openMaxF     most stray capacitance of the uncompensated fixture, in F
 * @param openMaxGS    most leakage of the uncompensated fixture, in S
 * @param shortMaxOhm  most |Z| of the uncompensated short, in Ω
 * @param openBandF    a compensated reading with less capacitance than this is the empty fixture, in F
 * @param shortBandOhm a compensated reading with less |Z| than this is the short bar, in Ω
 * @param dResolution  loss the compensated fixture resolves: R below −dResolution·|Z| is not a part's loss
 */
public record FixtureBounds(double openMaxF, double openMaxGS, double shortMaxOhm, double openBandF,
                            double shortBandOhm, double dResolution) {
    /** A part must read at least this factor away from the fixture's own open or short to be told apart. */
    public static final double MARGIN = 10;

    public static final FixtureBounds DEFAULT = new FixtureBounds(20e-12, 1e-6, 2, 0.5e-12, 0.05, 0.001);

    public FixtureBounds {
        pos("fixture.open_max_f", openMaxF);
        pos("fixture.open_max_g_s", openMaxGS);
        pos("fixture.short_max_ohm", shortMaxOhm);
        pos("fixture.open_check_f", openBandF);
        pos("fixture.short_check_ohm", shortBandOhm);
        pos("fixture.d_resolution", dResolution);
        if (dResolution > 0.1) throw new SpecException("fixture.d_resolution", "must be <= 0.1 (was " + dResolution + ")");
    }

    private static void pos(String key, double v) {
        if (!(v > 0) || !Double.isFinite(v)) throw new SpecException(key, "must be > 0 (was " + v + ")");
    }

    /** |Z| in Ω at and above which an uncompensated reading may be the empty fixture. */
    public double openZOhm(double freqHz) {
        return 1 / Impedance.magnitude(openMaxGS, 2 * Math.PI * freqHz * openMaxF);
    }

    /** Whether a reading is the empty fixture: near the stored open, or in the range of any uncompensated open. */
    public boolean isOpen(Impedance z, boolean openCompensated) {
        if (openCompensated) return 1 / z.zOhm() <= 2 * Math.PI * z.freqHz() * openBandF;
        return z.zOhm() >= openZOhm(z.freqHz());
    }

    /** Whether a reading is the short bar: near the stored short, or in the range of any uncompensated short. */
    public boolean isShort(Impedance z, boolean shortCompensated) {
        return z.zOhm() <= (shortCompensated ? shortBandOhm : shortMaxOhm);
    }

    /** Whether a part of this ideal |Z| cannot be told from the uncompensated open (within {@link #MARGIN}). */
    public boolean needsOpen(double idealZOhm, double freqHz) {
        return idealZOhm * MARGIN >= openZOhm(freqHz);
    }

    /** Whether a part of this ideal |Z| cannot be told from the uncompensated short (within {@link #MARGIN}). */
    public boolean needsShort(double idealZOhm) {
        return idealZOhm <= MARGIN * shortMaxOhm;
    }

    /** Whether R is negative beyond what the compensation resolves (stale compensation, not a part). */
    public boolean negativeBeyondResolution(Impedance z) {
        return z.rOhm() < -dResolution * z.zOhm();
    }
}
