package net.zbin.app;

import java.io.PrintWriter;
import java.util.Locale;
import net.zbin.core.Grade;
import net.zbin.core.GradingMode;
import net.zbin.core.Recipe;
import net.zbin.core.SiValue;

/** A recipe described for people: what the meter is set to and which bin takes which part. */
final class RecipeText {
    private RecipeText() {}

    static void print(PrintWriter out, Recipe r) {
        String unit = r.partType().unit();
        out.printf(Locale.ROOT, "recipe %s: %s, nominal %s%n", r.name(), r.partType().key(), SiValue.format(r.nominal(), unit));
        var t = r.test();
        out.printf(Locale.ROOT, "  test: %s, %s rms, speed %s, averaging %d%n", SiValue.format(t.freqHz(), "Hz"),
                SiValue.format(t.levelV(), "V"), t.speed(), t.averaging());
        var m = r.model();
        out.printf(Locale.ROOT, "  model: %s (series below %s, parallel above %s), primary %s%n",
                m.mode().name().toLowerCase(Locale.ROOT), SiValue.format(m.seriesBelowOhm(), "ohm"),
                SiValue.format(m.parallelAboveOhm(), "ohm"), r.primary() == null ? "by model" : r.primary().label());
        double w = r.guard().widthPct();
        out.printf(Locale.ROOT, "  grades (%s%s):%n", r.mode() == GradingMode.NESTED ? "nested, first match wins" : "sequential",
                w > 0 ? String.format(Locale.ROOT, ", guard band %.4g %% per %s", w,
                        r.mode() == GradingMode.NESTED ? "edge" : "outer edge") : "");
        for (int i = 0; i < r.grades().size(); i++) {
            Grade g = r.grades().get(i);
            boolean guardLow = r.mode() == GradingMode.NESTED || i == 0;
            boolean guardHigh = r.mode() == GradingMode.NESTED || i == r.grades().size() - 1;
            double lo = g.lowPct() + (guardLow ? w : 0), hi = g.highPct() - (guardHigh ? w : 0);
            out.printf(Locale.ROOT, "    bin %3d  %-8s %+8.4g %% .. %+8.4g %%   accepts %s .. %s%n", g.bin(), g.name(),
                    g.lowPct(), g.highPct(), SiValue.format(r.nominal() * (1 + lo / 100), unit),
                    SiValue.format(r.nominal() * (1 + hi / 100), unit));
        }
        var gt = r.gates();
        StringBuilder gates = new StringBuilder();
        if (gt.dMax() != null) gates.append(String.format(Locale.ROOT, " D <= %.4g", gt.dMax()));
        if (gt.qMin() != null) gates.append(String.format(Locale.ROOT, " Q >= %.4g", gt.qMin()));
        if (gt.esrMaxOhm() != null) gates.append(" ESR <= ").append(SiValue.format(gt.esrMaxOhm(), "ohm"));
        if (gt.thetaMinDeg() != null) gates.append(String.format(Locale.ROOT, " θ >= %.4g°", gt.thetaMinDeg()));
        if (gt.thetaMaxDeg() != null) gates.append(String.format(Locale.ROOT, " θ <= %.4g°", gt.thetaMaxDeg()));
        out.println("  gates:" + (gates.length() == 0 ? " none" : gates));
        var rb = r.reject();
        out.printf(Locale.ROOT, "  reject bins: low %d, high %d, gate %d, contact %d, short %d, overload %d, fault %d%n",
                rb.low(), rb.high(), rb.gate(), rb.contact(), rb.shortBin(), rb.overload(), rb.fault());
        out.printf(Locale.ROOT, "  retest: up to %d time(s) via bin %d; open contact above %.3g × ideal |Z|, short below %.3g ×%n",
                r.retest().count(), r.retest().bin(), r.contact().openFactor(), r.contact().shortFactor());
        out.printf(Locale.ROOT, "  compensation: %s%n", r.compensationRequired() ? "required" : "used when present");
    }
}
