package net.zbin.core;

/**
 * How far the compensated |Z| may stray from what an ideal part of the nominal shows before the
 * reading is taken as an open contact (the fixture) or a short (the contacts bridged).
 *
 * @param openFactor  |Z| above openFactor × ideal |Z| → open contact (&gt; 1)
 * @param shortFactor |Z| below shortFactor × ideal |Z| → short (0 … 1)
 */
public record ContactCheck(double openFactor, double shortFactor) {
    public static final ContactCheck DEFAULT = new ContactCheck(10, 0.01);

    public ContactCheck {
        if (!(openFactor > 1) || !Double.isFinite(openFactor))
            throw new SpecException("contact.open_factor", "must be > 1 (was " + openFactor + ")");
        if (!(shortFactor > 0 && shortFactor < 1))
            throw new SpecException("contact.short_factor", "must be > 0 and < 1 (was " + shortFactor + ")");
    }
}
