package net.zbin.core;

import java.math.BigDecimal;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Parses numbers as engineers write them, in one stated {@link Unit}: plain or with exponent
 * ({@code 1000}, {@code 1e-9}, {@code −5}), with an SI prefix and optionally the unit ({@code 100n},
 * {@code 100nF}, {@code 4.7µH}, {@code 1kHz}), or in IEC 60062 RKM form where the prefix letter stands for
 * the decimal point ({@code 2p2}, {@code 4u7}, {@code 4k7}, {@code 1M5}).
 *
 * <p>A number means what it says: a plain number is a plain value in the unit, never a marking code
 * (those are read by {@link MarkingCode}, from an explicit form). A written unit must be the expected
 * one. {@code R} as decimal marker or unit ({@code 4R7}, {@code 10R}) and {@code K} for kilo belong to
 * resistance only. Decimal text is converted exactly: {@code 2p2} is the double nearest 2.2e-12.
 * "m" is milli and "M" mega.
 */
public final class SiValue {
    private SiValue() {}

    private static final String NUM = "([+-]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][+-]?\\d+)?)";
    private static final Pattern PLAIN = Pattern.compile(NUM + "\\s*([fpnuµμmkKMGTR]?)\\s*(\\S*)");
    private static final Pattern RKM = Pattern.compile("([+-]?)(\\d*)([pnuµμmkKMGR])(\\d+)\\s*(\\S*)");

    /**
     * @throws IllegalArgumentException naming the text and what is wrong when it is not a number in this unit
     */
    public static double parse(String text, Unit unit) {
        if (text == null) throw new IllegalArgumentException("value is missing");
        String s = text.trim().replace('\u2212', '-');
        if (s.isEmpty()) throw new IllegalArgumentException("value is empty");
        Matcher r = RKM.matcher(s);
        if (r.matches() && (!r.group(2).isEmpty() || r.group(3).equals("R"))) {
            String prefix = r.group(3);
            checkUnit(text, r.group(5), unit);
            checkPrefix(text, prefix, unit);
            String whole = r.group(2).isEmpty() ? "0" : r.group(2);
            return exact(r.group(1) + whole + "." + r.group(4), prefix);
        }
        Matcher m = PLAIN.matcher(s);
        if (m.matches()) {
            String prefix = m.group(2), written = m.group(3);
            // "100F" is 100 farads: F is a unit, femto is f.
            checkUnit(text, written, unit);
            checkPrefix(text, prefix, unit);
            return exact(m.group(1), prefix);
        }
        throw new IllegalArgumentException("'" + text + "' is not a number" + example(unit));
    }

    private static void checkUnit(String text, String written, Unit unit) {
        if (written.isEmpty() || unit.accepts(written)) return;
        Unit other = Unit.owning(written);
        if (other != null)
            throw new IllegalArgumentException("'" + text + "' is " + other.withArticle() + " (" + written + "), but "
                    + unit.withArticle() + " is expected" + example(unit));
        throw new IllegalArgumentException("'" + text + "': unknown unit '" + written + "'" + example(unit));
    }

    private static void checkPrefix(String text, String prefix, Unit unit) {
        if (prefix.isEmpty()) return;
        if (!unit.takesPrefix())
            throw new IllegalArgumentException("'" + text + "': " + unit.withArticle() + " takes no SI prefix" + example(unit));
        if ((prefix.equals("R") || prefix.equals("K")) && unit != Unit.OHM)
            throw new IllegalArgumentException("'" + text + "': '" + prefix + "' is resistor notation (R = ohm, K = kilo-ohm), "
                    + "not " + unit.withArticle() + example(unit)
                    + (prefix.equals("R") ? "; a marking code is written {code: " + text.trim() + "} in a recipe" : ""));
    }

    private static double exact(String mantissa, String prefix) {
        BigDecimal v = new BigDecimal(mantissa.startsWith("+") ? mantissa.substring(1) : mantissa);
        double d = v.scaleByPowerOfTen(exponent(prefix)).doubleValue();
        return d == 0 ? 0.0 : d; // no negative zero: -0 means 0
    }

    private static int exponent(String p) {
        if (p.isEmpty()) return 0;
        return switch (p.charAt(0)) {
            case 'f' -> -15;
            case 'p' -> -12;
            case 'n' -> -9;
            case 'u', 'µ', 'μ' -> -6;
            case 'm' -> -3;
            case 'R' -> 0;
            case 'k', 'K' -> 3;
            case 'M' -> 6;
            case 'G' -> 9;
            case 'T' -> 12;
            default -> throw new IllegalArgumentException("unknown SI prefix '" + p + "'");
        };
    }

    private static String example(Unit unit) {
        return switch (unit) {
            case HERTZ -> " (examples: 1k, 100kHz, 1e6)";
            case OHM -> " (examples: 4.7k, 4K7, 4R7, 100mΩ, 1e3)";
            case FARAD -> " (examples: 100n, 2p2, 4.7uF, 1e-9)";
            case HENRY -> " (examples: 4u7, 10uH, 1e-6)";
            case SIEMENS -> " (examples: 1u, 10nS)";
            case VOLT -> " (examples: 1, 0.5V, 500m)";
            case SECOND -> " (examples: 1, 200m, 5s)";
            case DEGREE -> " (examples: -88.4, 45°)";
            case PERCENT -> " (examples: 5, 0.25, 10%)";
            case RATIO -> " (examples: 0.025, 10, 1e-3)";
            case ANY -> " (examples: 100n, 4.7u, 2p2, 1e-9)";
        };
    }

    /** Formats with an SI prefix and 4 significant digits for people: 1.000e-7 F → "100.0 nF". */
    public static String format(double v, String unit) {
        return format(v, unit, 4);
    }

    /** Formats with an SI prefix and the given significant digits; ∞ for infinite, "-" for NaN. */
    public static String format(double v, String unit, int digits) {
        String unitText = unit.equals("ohm") ? "Ω" : unit;
        if (Double.isNaN(v)) return "- " + unitText;
        if (Double.isInfinite(v)) return (v > 0 ? "∞ " : "-∞ ") + unitText;
        if (v == 0) return "0 " + unitText;
        double a = Math.abs(v);
        String[] pre = {"f", "p", "n", "µ", "m", "", "k", "M", "G", "T"};
        int idx = (int) Math.floor(Math.log10(a) / 3) + 5;
        idx = Math.max(0, Math.min(pre.length - 1, idx));
        double scaled = v / Math.pow(1000, idx - 5);
        return String.format(java.util.Locale.ROOT, "%." + digits + "g %s%s", scaled, pre[idx], unitText);
    }

    /** The short form to write a value in a config file or on the command line: 1e6 → "1M", 2e-11 → "20p", 4.7e-6 → "4.7u". */
    public static String compact(double v) { return compact(v, null); }

    /** The same for people, with the unit: 1e6, "Hz" → "1 MHz"; 2e-11, "F" → "20 pF". */
    public static String compact(double v, String unit) {
        if (v == 0 || !Double.isFinite(v)) return Double.toString(v) + (unit == null ? "" : " " + unit);
        String[] pre = {"f", "p", "n", "u", "m", "", "k", "M", "G", "T"};
        int idx = (int) Math.floor(Math.log10(Math.abs(v)) / 3) + 5;
        idx = Math.max(0, Math.min(pre.length - 1, idx));
        String num = plain(new java.math.BigDecimal(v).scaleByPowerOfTen(-3 * (idx - 5)).doubleValue());
        if (unit == null) return num + pre[idx];
        return num + " " + (pre[idx].equals("u") ? "µ" : pre[idx]) + (unit.equals("ohm") ? "Ω" : unit);
    }

    /** A plain number with at most 6 significant digits and no trailing zeros: 0.1 → "0.1", 10.0 → "10". */
    public static String plain(double v) {
        if (!Double.isFinite(v)) return Double.toString(v);
        return new java.math.BigDecimal(v).round(new java.math.MathContext(6)).stripTrailingZeros().toPlainString();
    }

    /** A plain ratio for people (D, Q): 5 significant digits, ∞ for infinite, "-" for NaN. */
    public static String ratio(double v) {
        if (Double.isNaN(v)) return "-";
        if (Double.isInfinite(v)) return v > 0 ? "∞" : "-∞";
        return String.format(java.util.Locale.ROOT, "%.5g", v);
    }
}
