package net.zbin.core;

import java.util.Locale;

/** The kind of passive part a recipe sorts. */
public enum PartType {
    CAPACITOR("F"), INDUCTOR("H"), RESISTOR("ohm");

    private final String unit;

    PartType(String unit) { this.unit = unit; }

    /** Unit of the nominal value. */
    public String unit() { return unit; }

    /**
     * |Z| in ohms that an ideal part of this nominal shows at the given frequency; used to judge
     * open contacts and shorts against what the part should read.
     */
    public double idealZOhm(double nominal, double freqHz) {
        double w = 2 * Math.PI * freqHz;
        return switch (this) {
            case CAPACITOR -> 1 / (w * nominal);
            case INDUCTOR -> w * nominal;
            case RESISTOR -> nominal;
        };
    }

    private final String key = name().toLowerCase(Locale.ROOT); // once: keys are written per decision

    public String key() { return key; }

    /** "a capacitor", "an inductor", "a resistor". */
    public String withArticle() { return (this == INDUCTOR ? "an " : "a ") + key(); }

    public static PartType parse(String s) {
        for (PartType t : values()) if (t.key().equalsIgnoreCase(s)) return t;
        throw new IllegalArgumentException("unknown part type '" + s + "' (expected capacitor, inductor or resistor)");
    }
}
