package net.zbin.core;

import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Parses numbers as engineers write them: plain or exponent ({@code 1e-9}), with an SI prefix and
 * an optional unit ({@code 100n}, {@code 100nF}, {@code 4.7u}, {@code 4.7µH}, {@code 1k}, {@code 10kohm}),
 * or in IEC 60062 RKM form where the prefix letter is the decimal point ({@code 2p2}, {@code 4R7},
 * {@code R47}, {@code 4K7}, {@code 1M5}). "m" is milli and "M" mega; "R" stands for the unit ohm.
 */
public final class SiValue {
    private SiValue() {}

    private static final Pattern PLAIN = Pattern.compile(
            "([+-]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][+-]?\\d+)?)\\s*([fpnuµμmkKMGTR]?)\\s*(F|H|Ω|ohms?|Ohms?|OHMS?|V|Hz|hz|A|S|s|%)?");
    private static final Pattern RKM = Pattern.compile("(\\d*)([pnuµμmkKMGR])(\\d+)\\s*(F|H|Ω|ohms?)?");

    /**
     * @throws IllegalArgumentException naming the text when it is not a number of this form
     */
    public static double parse(String text) {
        if (text == null) throw new IllegalArgumentException("value is missing");
        String s = text.trim();
        if (s.isEmpty()) throw new IllegalArgumentException("value is empty");
        Matcher m = PLAIN.matcher(s);
        if (m.matches()) {
            String prefix = m.group(2);
            String unit = m.group(3);
            // "100F" is 100 farads, not 100 femto: F after a number with no other unit is the unit.
            if (prefix.isEmpty() || prefix.equals("R")) return Double.parseDouble(m.group(1));
            if (prefix.equals("F") && unit == null) return Double.parseDouble(m.group(1));
            return Double.parseDouble(m.group(1)) * multiplier(prefix.charAt(0));
        }
        Matcher r = RKM.matcher(s);
        if (r.matches()) {
            String whole = r.group(1).isEmpty() ? "0" : r.group(1);
            return Double.parseDouble(whole + "." + r.group(3)) * multiplier(r.group(2).charAt(0));
        }
        throw new IllegalArgumentException("'" + text + "' is not a number (examples: 100n, 4.7u, 2p2, 4K7, 1e-9)");
    }

    static double multiplier(char p) {
        return switch (p) {
            case 'f' -> 1e-15;
            case 'p' -> 1e-12;
            case 'n' -> 1e-9;
            case 'u', 'µ', 'μ' -> 1e-6;
            case 'm' -> 1e-3;
            case 'R' -> 1;
            case 'k', 'K' -> 1e3;
            case 'M' -> 1e6;
            case 'G' -> 1e9;
            case 'T' -> 1e12;
            default -> throw new IllegalArgumentException("unknown SI prefix '" + p + "'");
        };
    }

    /** Formats with an SI prefix and 4 significant digits for people: 1.000e-7 F → "100.0 nF". */
    public static String format(double v, String unit) {
        String unitText = unit.equals("ohm") ? "Ω" : unit;
        if (Double.isNaN(v)) return "- " + unitText;
        if (Double.isInfinite(v)) return (v > 0 ? "∞ " : "-∞ ") + unitText;
        if (v == 0) return "0 " + unitText;
        double a = Math.abs(v);
        String[] pre = {"f", "p", "n", "µ", "m", "", "k", "M", "G", "T"};
        int idx = (int) Math.floor(Math.log10(a) / 3) + 5;
        idx = Math.max(0, Math.min(pre.length - 1, idx));
        double scaled = v / Math.pow(1000, idx - 5);
        return String.format(java.util.Locale.ROOT, "%.4g %s%s", scaled, pre[idx], unitText);
    }

}
