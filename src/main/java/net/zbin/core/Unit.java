package net.zbin.core;

import java.util.List;
import java.util.Locale;

/**
 * The unit a number is read in. A number written with a unit must carry this one (or one of its
 * spellings): {@code 1kHz} is a frequency and nothing else, so {@code --r 1kHz} is refused rather than
 * read as 1000 Ω. {@link #ANY} is for files whose fields carry their own unit (simulator scenarios).
 */
public enum Unit {
    HERTZ("frequency", "Hz", List.of("Hz", "hz")),
    OHM("resistance or reactance", "Ω", List.of("Ω", "ohm", "ohms", "Ohm", "Ohms", "OHM", "OHMS")),
    FARAD("capacitance", "F", List.of("F")),
    HENRY("inductance", "H", List.of("H")),
    SIEMENS("conductance", "S", List.of("S")),
    VOLT("voltage", "V", List.of("V")),
    SECOND("time", "s", List.of("s")),
    /** Angle in degrees; SI prefixes are not taken. */
    DEGREE("angle", "°", List.of("°", "deg")),
    /** A percentage; SI prefixes are not taken. */
    PERCENT("percentage", "%", List.of("%")),
    /** A plain ratio (D, Q, a factor); neither prefix nor unit. */
    RATIO("ratio", "", List.of()),
    /** Any of the SI units above, with prefixes; the field names its own unit. */
    ANY("value", "", List.of("Hz", "hz", "Ω", "ohm", "ohms", "F", "H", "S", "V", "s"));

    private final String quantity;
    private final String symbol;
    private final List<String> spellings;

    Unit(String quantity, String symbol, List<String> spellings) {
        this.quantity = quantity;
        this.symbol = symbol;
        this.spellings = spellings;
    }

    /** What is measured in it, for messages ("capacitance"). */
    public String quantity() { return quantity; }

    /** "a capacitance", "an inductance". */
    public String withArticle() { return ("aeiou".indexOf(quantity.charAt(0)) >= 0 ? "an " : "a ") + quantity; }

    /** The symbol for people ("Ω", "Hz"). */
    public String symbol() { return symbol; }

    public boolean accepts(String written) { return spellings.contains(written); }

    /** Whether SI prefixes (k, m, µ, …) apply to numbers in this unit. */
    public boolean takesPrefix() { return this != DEGREE && this != PERCENT && this != RATIO; }

    /** The unit of a part type's nominal value. */
    public static Unit of(PartType type) {
        return switch (type) {
            case CAPACITOR -> FARAD;
            case INDUCTOR -> HENRY;
            case RESISTOR -> OHM;
        };
    }

    /** The unit that a written unit text belongs to, or null when it is none of ours. */
    static Unit owning(String written) {
        for (Unit u : values()) if (u != ANY && u.accepts(written)) return u;
        return null;
    }

    private final String key = name().toLowerCase(Locale.ROOT);

    @Override
    public String toString() { return key; }
}
