package net.zbin.core;

/**
 * Numeric marking codes (IEC 60062): three digits = two significant figures and a multiplier
 * (capacitors in pF, 9 → ×0.1, 8 → ×0.01); four digits (resistors) = three figures and a multiplier.
 */
public final class MarkingCode {
    private MarkingCode() {}

    /**
     * Reads a code for a part type: capacitors in farads, resistors in ohms.
     *
     * @throws IllegalArgumentException when the text is not a code this part type uses
     */
    public static double parse(String code, PartType type) {
        String s = code.trim();
        if (!s.matches("\\d{3,4}"))
            throw new IllegalArgumentException("'" + code + "' is not a 3- or 4-digit marking code");
        if (type == PartType.INDUCTOR)
            throw new IllegalArgumentException("marking codes are read for capacitors and resistors, not inductors");
        if (type == PartType.CAPACITOR && s.length() == 4)
            throw new IllegalArgumentException("'" + code + "': capacitor codes have 3 digits");
        int figures = Integer.parseInt(s.substring(0, s.length() - 1));
        int mult = s.charAt(s.length() - 1) - '0';
        double factor = switch (mult) {
            case 8 -> 0.01;
            case 9 -> 0.1;
            default -> Math.pow(10, mult);
        };
        if (mult == 7) throw new IllegalArgumentException("'" + code + "': multiplier digit 7 is not used");
        double v = figures * factor;
        return type == PartType.CAPACITOR ? v * 1e-12 : v;
    }

    /** A recipe value: a marking code if the text is all digits of code length, else {@link SiValue}. */
    public static double parseValue(String text, PartType type) {
        String s = text.trim();
        if (s.matches("\\d{3,4}") && type != PartType.INDUCTOR) {
            if (type == PartType.CAPACITOR && s.length() == 3 || type == PartType.RESISTOR) return parse(s, type);
        }
        return SiValue.parse(s);
    }
}
