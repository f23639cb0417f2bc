package net.zbin.core;

/**
 * One complex impedance Z = R + jX at one test frequency, and everything derived from it.
 *
 * <p>Sign convention: X &lt; 0 is capacitive (θ &lt; 0), X &gt; 0 inductive. Derived quantities are
 * computed on demand from the three stored numbers so that there is one source of truth.
 *
 * @param freqHz test frequency in hertz, finite and &gt; 0
 * @param rOhm   resistive part in ohms (may be slightly negative after compensation of a low-loss part)
 * @param xOhm   reactive part in ohms
 */
public record Impedance(double freqHz, double rOhm, double xOhm) {
    public Impedance {
        Checks.positive("freqHz", freqHz);
        Checks.finite("rOhm", rOhm);
        Checks.finite("xOhm", xOhm);
        rOhm += 0.0; // −0 is 0: "--r -0" and "--r 0" are the same reading
        xOhm += 0.0;
    }

    /** Builds from magnitude in ohms and phase in degrees, as many meters report. */
    public static Impedance fromPolar(double freqHz, double zOhm, double thetaDeg) {
        Checks.finite("zOhm", zOhm);
        if (zOhm < 0) throw new IllegalArgumentException("zOhm must be >= 0 (was " + zOhm + ")");
        Checks.finite("thetaDeg", thetaDeg);
        if (thetaDeg < -90 || thetaDeg > 90)
            throw new IllegalArgumentException("thetaDeg must be within -90..90 (was " + thetaDeg + ")");
        double t = Math.toRadians(thetaDeg);
        return new Impedance(freqHz, zOhm * Math.cos(t), zOhm * Math.sin(t));
    }

    /** Angular frequency ω = 2πf in rad/s. */
    public double omega() { return 2 * Math.PI * freqHz; }

    /**
     * |Z| in ohms: √(R² + X²) directly (a few ns; {@code Math.hypot} is ten times that and too big to inline on the
     * hot path), falling back to hypot only where the squares would overflow or underflow.
     */
    public double zOhm() { return magnitude(rOhm, xOhm); }

    /** √(a² + b²) without {@code Math.hypot}'s cost where the squares neither overflow nor underflow (see {@link #zOhm}). */
    public static double magnitude(double a, double b) {
        double s = Math.sqrt(a * a + b * b);
        return s == Double.POSITIVE_INFINITY || s < 1e-150 && (a != 0 || b != 0) ? Math.hypot(a, b) : s;
    }

    /** Phase angle in degrees, −90 (pure C) … +90 (pure L). */
    public double thetaDeg() { return Math.toDegrees(Math.atan2(xOhm, rOhm)); }

    private double y2() { return rOhm * rOhm + xOhm * xOhm; }

    /** Conductance of Y = 1/Z in siemens. */
    public double gS() { return rOhm / y2(); }

    /** Susceptance of Y = 1/Z in siemens (positive for a capacitor). */
    public double bS() { return -xOhm / y2(); }

    /** Series capacitance in farads, −1/(ωX); negative for an inductive reading. */
    public double csF() { return -1 / (omega() * xOhm); }

    /** Parallel capacitance in farads, B/ω. */
    public double cpF() { return bS() / omega(); }

    /** Series inductance in henries, X/ω. */
    public double lsH() { return xOhm / omega(); }

    /** Parallel inductance in henries, −1/(ωB). */
    public double lpH() { return -1 / (omega() * bS()); }

    public double rsOhm() { return rOhm; }

    /** Parallel resistance in ohms, 1/G. */
    public double rpOhm() { return 1 / gS(); }

    /**
     * Dissipation factor D = R/|X| = tan δ; the same in series and parallel models. +∞ for a pure
     * resistance (X = 0); slightly negative when compensation left R just below zero.
     */
    public double d() { return rOhm / Math.abs(xOhm); }

    /** Quality factor Q = 1/D; +∞ when R ≤ 0 (no loss the meter can see), 0 for a pure resistance. */
    public double q() { return rOhm > 0 ? Math.abs(xOhm) / rOhm : Double.POSITIVE_INFINITY; }

    /** Equivalent series resistance in ohms (the series-model R). */
    public double esrOhm() { return rOhm; }

    /** Value of one primary parameter in SI units. */
    public double value(PrimaryParam p) {
        return switch (p) {
            case CS -> csF();
            case CP -> cpF();
            case LS -> lsH();
            case LP -> lpH();
            case RS -> rsOhm();
            case RP -> rpOhm();
            case Z -> zOhm();
        };
    }
}
