package net.zbin.core;

import java.math.BigDecimal;

/**
 * Marking codes as the trade writes them on parts and in part numbers (IEC 60062), read only where a
 * recipe asks for a code explicitly — a plain number is never taken for one.
 *
 * <ul>
 *   <li>Capacitors, in pF: three digits = two figures and a multiplier ({@code 104} = 100 nF; 9 → ×0.1,
 *       8 → ×0.01), or {@code R} as decimal marker ({@code 4R7} = 4.7 pF).</li>
 *   <li>Inductors, in µH: three digits ({@code 101} = 100 µH, {@code 100} = 10 µH), {@code R} as decimal
 *       marker ({@code 4R7} = 4.7 µH, {@code R47} = 0.47 µH), {@code N} as decimal marker in nH
 *       ({@code 4N7} = 4.7 nH).</li>
 *   <li>Resistors, in Ω: three or four digits ({@code 472} = 4.7 kΩ, {@code 4992} = 49.9 kΩ) or RKM
 *       ({@code 4R7}, {@code R47}, {@code 4K7}, {@code 1M5}).</li>
 * </ul>
 */
public final class MarkingCode {
    private MarkingCode() {}

    /**
     * The value of a code for a part type, in F, H or Ω.
     *
     * @throws IllegalArgumentException naming the code and the forms this part type uses
     */
    public static double parse(String code, PartType type) {
        String s = code.trim();
        if (s.matches("\\d{3,4}")) return digits(s, type);
        String markers = switch (type) {
            case CAPACITOR -> "R";
            case INDUCTOR -> "RN";
            case RESISTOR -> "RKM";
        };
        if (s.matches("\\d*[" + markers + "]\\d+") && !s.matches("[KMN]\\d+")) {
            int at = 0;
            while (Character.isDigit(s.charAt(at))) at++;
            char marker = s.charAt(at);
            String whole = at == 0 ? "0" : s.substring(0, at);
            int exp = switch (marker) {
                case 'K' -> 3;
                case 'M' -> 6;
                case 'N' -> -3; // nH expressed in µH below
                default -> 0;
            };
            BigDecimal v = new BigDecimal(whole + "." + s.substring(at + 1)).scaleByPowerOfTen(exp);
            return inUnit(v, type);
        }
        throw new IllegalArgumentException("'" + code + "' is not a " + type.key() + " marking code (" + forms(type) + ")");
    }

    private static double digits(String s, PartType type) {
        if (type != PartType.RESISTOR && s.length() == 4)
            throw new IllegalArgumentException("'" + s + "': " + type.key() + " codes have 3 digits (" + forms(type) + ")");
        int mult = s.charAt(s.length() - 1) - '0';
        if (mult == 7) throw new IllegalArgumentException("'" + s + "': multiplier digit 7 is not used");
        int exp = switch (mult) {
            case 8 -> -2;
            case 9 -> -1;
            default -> mult;
        };
        return inUnit(new BigDecimal(s.substring(0, s.length() - 1)).scaleByPowerOfTen(exp), type);
    }

    private static double inUnit(BigDecimal v, PartType type) {
        return switch (type) {
            case CAPACITOR -> v.scaleByPowerOfTen(-12).doubleValue();
            case INDUCTOR -> v.scaleByPowerOfTen(-6).doubleValue();
            case RESISTOR -> v.doubleValue();
        };
    }

    /** The code forms a part type takes, for messages. */
    public static String forms(PartType type) {
        return switch (type) {
            case CAPACITOR -> "capacitor codes are in pF: 3 digits like 104 = 100 nF, or R as decimal marker like 4R7 = 4.7 pF";
            case INDUCTOR -> "inductor codes are in µH: 3 digits like 101 = 100 µH, R as decimal marker like 4R7 = 4.7 µH, N for nH like 4N7";
            case RESISTOR -> "resistor codes are in Ω: 3 or 4 digits like 472 = 4.7 kΩ, 4992 = 49.9 kΩ, or RKM like 4R7, 4K7, 1M5";
        };
    }
}
