package net.zbin.core;

/**
 * Plausibility limits for a compensation capture, so that a part left on the contacts is never
 * stored as "the fixture".
 *
 * @param openMaxF      an open reading with more capacitance than this is a part, in farads
 * @param openMaxGS     an open reading with more conductance than this is a part or a leak, in siemens
 * @param shortMaxOhm   a short reading with |Z| above this is not a short, in ohms
 * @param loadMaxDevPct a load reading farther than this from the standard's value is the wrong standard, in %
 * @param repeats       readings averaged per capture
 */
public record FixtureLimits(double openMaxF, double openMaxGS, double shortMaxOhm, double loadMaxDevPct, int repeats) {
    public static final FixtureLimits DEFAULT = new FixtureLimits(20e-12, 1e-6, 2, 10, 4);

    public FixtureLimits {
        if (!(openMaxF > 0)) throw new SpecException("fixture.open_max_f", "must be > 0 (was " + openMaxF + ")");
        if (!(openMaxGS > 0)) throw new SpecException("fixture.open_max_g_s", "must be > 0 (was " + openMaxGS + ")");
        if (!(shortMaxOhm > 0)) throw new SpecException("fixture.short_max_ohm", "must be > 0 (was " + shortMaxOhm + ")");
        if (!(loadMaxDevPct > 0)) throw new SpecException("fixture.load_max_dev_pct", "must be > 0 (was " + loadMaxDevPct + ")");
        Plausible.atMost("fixture.open_max_f", openMaxF, 1e-9, "F", "a bare fixture's stray is a few pF", 1e-12, "picofarads");
        Plausible.atMost("fixture.open_max_g_s", openMaxGS, 1e-3, "S", "an open fixture leaks far less", 1e-6, "microsiemens");
        Plausible.atMost("fixture.short_max_ohm", shortMaxOhm, 100, "Ω", "a short bar reads milliohms", 1e-3, "milliohms");
        if (repeats < 1 || repeats > 100) throw new SpecException("fixture.repeats", "must be 1..100 (was " + repeats + ")");
    }

    /** Null when the reading can be the open fixture, else why not. */
    public String checkOpen(Impedance z) {
        double g = z.gS(), c = z.cpF();
        if (c > openMaxF)
            return String.format(java.util.Locale.ROOT, "open reads %s of capacitance (limit %s): is a part on the contacts?",
                    SiValue.format(c, "F"), SiValue.format(openMaxF, "F"));
        if (g > openMaxGS)
            return String.format(java.util.Locale.ROOT, "open reads %s of conductance (limit %s): a part or a leak on the contacts?",
                    SiValue.format(g, "S"), SiValue.format(openMaxGS, "S"));
        if (c < -openMaxF) return "open reads inductive (" + SiValue.format(z.lpH(), "H") + "): contacts bridged?";
        return null;
    }

    /** Null when the reading can be the shorted fixture, else why not. */
    public String checkShort(Impedance z) {
        if (z.zOhm() > shortMaxOhm)
            return "short reads " + SiValue.format(z.zOhm(), "ohm") + " (limit " + SiValue.format(shortMaxOhm, "ohm")
                    + "): is the short bar in place?";
        return null;
    }

    /** Null when the reading can be the load standard, else why not. */
    public String checkLoad(Impedance measured, Impedance standard) {
        double dr = measured.rOhm() - standard.rOhm(), dx = measured.xOhm() - standard.xOhm();
        double dev = Math.hypot(dr, dx) / standard.zOhm() * 100;
        if (dev > loadMaxDevPct)
            return String.format(java.util.Locale.ROOT, "load reads %.3g %% away from the standard (limit %.3g %%): wrong standard?", dev, loadMaxDevPct);
        return null;
    }
}
