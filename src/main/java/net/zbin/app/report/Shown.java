package net.zbin.app.report;

import java.util.Locale;

/**
 * A figure as people read it: formatted, or "–" (as the status page shows it) when there is none. A lot with fewer
 * than two graded parts has no σ and so no Cp or Cpk, one with no finished part no yield and no risk (NaN inside);
 * printed through {@code %f} that came out as "NaN".
 */
public final class Shown {
    /** What stands where a figure is not defined. */
    public static final String NONE = "–";

    private Shown() {}

    /** {@code v} through {@code format} (one {@code %} conversion, e.g. {@code "%.4f %%"}), or {@link #NONE} when it is not finite. */
    public static String of(String format, double v) {
        return Double.isFinite(v) ? String.format(Locale.ROOT, format, v) : NONE;
    }
}
