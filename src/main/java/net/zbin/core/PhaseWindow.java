package net.zbin.core;

/**
 * The phase a reading must have to be graded as its part type at all. A capacitor with D above 1
 * (θ above −45°) is mostly a resistor; grading its C would sort a leaking part by a number that does not
 * describe it. Defaults: capacitor −90°…−45° (D ≤ 1), inductor +45°…+90° (Q ≥ 1), resistor −45°…+45°
 * (|X| ≤ R). A recipe may widen them explicitly.
 *
 * @param minDeg lowest plausible θ in degrees, −90 … 90
 * @param maxDeg highest plausible θ in degrees, above minDeg
 */
public record PhaseWindow(double minDeg, double maxDeg, double cosMin, double sinMin, double cosMax, double sinMax) {
    /** The window from −90…90° bounds; the sines and cosines are kept so a reading is judged without an atan2. */
    public PhaseWindow(double minDeg, double maxDeg) {
        this(minDeg, maxDeg, Math.cos(Math.toRadians(minDeg)), Math.sin(Math.toRadians(minDeg)), Math.cos(Math.toRadians(maxDeg)),
                Math.sin(Math.toRadians(maxDeg)));
    }

    public PhaseWindow {
        if (!(minDeg >= -90 && minDeg <= 90))
            throw new SpecException("plausible.theta_min_deg", "must be within -90..90 (was " + minDeg + ")");
        if (!(maxDeg >= -90 && maxDeg <= 90))
            throw new SpecException("plausible.theta_max_deg", "must be within -90..90 (was " + maxDeg + ")");
        if (minDeg >= maxDeg)
            throw new SpecException("plausible.theta_min_deg", "must be below theta_max_deg (" + minDeg + " >= " + maxDeg + ")");
    }

    public static PhaseWindow defaultFor(PartType type) {
        return switch (type) {
            case CAPACITOR -> new PhaseWindow(-90, -45);
            case INDUCTOR -> new PhaseWindow(45, 90);
            case RESISTOR -> new PhaseWindow(-45, 45);
        };
    }

    /**
     * Whether the reading's phase lies in the window. R is taken as at least 0 here: a loss within the
     * compensation's resolution below zero is still a loss-free reading, not a phase beyond ±90°.
     */
    public boolean admits(Impedance z) {
        double r = Math.max(z.rOhm(), 0), x = z.xOhm();
        if (r == 0 && x == 0) return minDeg <= 0 && maxDeg >= 0; // atan2(0, 0) is 0°
        // With θ and a bound both in −90…90°, θ ≥ bound exactly when sin(θ − bound) ≥ 0, i.e. x·cos b − r·sin b ≥ 0
        // ((r, x) = |Z|(cos θ, sin θ)); the ±90° bounds are always met.
        boolean above = minDeg <= -90 || x * cosMin - r * sinMin >= 0;
        boolean below = maxDeg >= 90 || x * cosMax - r * sinMax <= 0;
        return above && below;
    }
}
