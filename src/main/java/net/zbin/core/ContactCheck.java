package net.zbin.core;

/**
 * How a reading is told from an open contact (the fixture) or a short (the contacts bridged): by the
 * fixture's own bounds, and by how far the reading strays from what an ideal part of the nominal shows.
 * For capacitors and inductors the reactance is compared (an open shows the stray's huge reactance; a
 * lossy part shows its own reactance plus a large R, which is a phase matter, not a contact one); for
 * resistors |Z|.
 *
 * @param openFactor  reactance (|Z| for resistors) above openFactor × ideal |Z| → open contact (&gt; 1)
 * @param shortFactor |Z| below shortFactor × ideal |Z| → short (0 … 1)
 * @param fixture     what the fixture itself reads
 */
public record ContactCheck(double openFactor, double shortFactor, FixtureBounds fixture) {
    public static final ContactCheck DEFAULT = new ContactCheck(10, 0.01, FixtureBounds.DEFAULT);

    public ContactCheck {
        if (!(openFactor > 1) || !Double.isFinite(openFactor))
            throw new SpecException("contact.open_factor", "must be > 1 (was " + openFactor + ")");
        if (!(shortFactor > 0 && shortFactor < 1))
            throw new SpecException("contact.short_factor", "must be > 0 and < 1 (was " + shortFactor + ")");
        if (fixture == null) fixture = FixtureBounds.DEFAULT;
    }

    public ContactCheck(double openFactor, double shortFactor) {
        this(openFactor, shortFactor, FixtureBounds.DEFAULT);
    }

    public ContactCheck withFixture(FixtureBounds f) { return new ContactCheck(openFactor, shortFactor, f); }

    /** Whether the reading is the empty fixture for a part of this type and ideal |Z|. */
    public boolean isOpen(PartType type, double idealZOhm, Impedance z, boolean openCompensated) {
        if (fixture.isOpen(z, openCompensated)) return true;
        double far = openFactor * idealZOhm;
        return type == PartType.RESISTOR ? z.zOhm() > far : Math.abs(z.xOhm()) > far;
    }

    /** Whether the reading is the contacts bridged for a part of this ideal |Z|. */
    public boolean isShort(double idealZOhm, Impedance z, boolean shortCompensated) {
        return fixture.isShort(z, shortCompensated) || z.zOhm() < shortFactor * idealZOhm;
    }
}
