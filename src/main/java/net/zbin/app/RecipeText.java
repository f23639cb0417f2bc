package net.zbin.app;

import java.io.PrintWriter;
import java.util.Locale;
import net.zbin.core.Grade;
import net.zbin.core.GradingMode;
import net.zbin.core.ModelPolicy;
import net.zbin.core.Recipe;
import net.zbin.core.SiValue;

/** A recipe described for people: what the meter is set to, which model, and which bin takes which part. */
final class RecipeText {
    private RecipeText() {}

    /** The gates as people read them, each with a leading space ("" when none). */
    static String gates(net.zbin.core.Gates gt) {
        StringBuilder gates = new StringBuilder();
        if (gt.dMax() != null) gates.append(String.format(Locale.ROOT, " D <= %.4g", gt.dMax()));
        if (gt.qMin() != null) gates.append(String.format(Locale.ROOT, " Q >= %.4g", gt.qMin()));
        if (gt.esrMaxOhm() != null) gates.append(" ESR <= ").append(SiValue.format(gt.esrMaxOhm(), "ohm"));
        if (gt.thetaMinDeg() != null) gates.append(String.format(Locale.ROOT, " θ >= %.4g°", gt.thetaMinDeg()));
        if (gt.thetaMaxDeg() != null) gates.append(String.format(Locale.ROOT, " θ <= %.4g°", gt.thetaMaxDeg()));
        return gates.toString();
    }

    static void print(PrintWriter out, Recipe r, String fixtureSource) {
        String unit = r.partType().unit();
        int digits = digits(r);
        out.printf(Locale.ROOT, "recipe %s: %s, nominal %s%n", r.name(), r.partType().key(), SiValue.format(r.nominal(), unit, digits));
        var t = r.test();
        out.printf(Locale.ROOT, "  test: %s, %s rms, speed %s, averaging %d%n", SiValue.format(t.freqHz(), "Hz"),
                SiValue.format(t.levelV(), "V"), t.speed(), t.averaging());
        out.printf(Locale.ROOT, "  model: %s, primary %s — %s%n", r.equivalentModel().key(), r.primaryParam().label(), modelWhy(r));
        GradingMode mode = r.mode();
        double w = r.guard().widthPct();
        out.printf(Locale.ROOT, "  grades (%s%s):%n", mode == GradingMode.CONCENTRIC ? "concentric, tightest first" : "ladder, low to high",
                w > 0 ? String.format(Locale.ROOT, ", guard band %.4g %% of each limit", w) : "");
        for (Grade g : r.grades()) {
            double lo = g.acceptLowPct(r.guard()), hi = g.acceptHighPct(r.guard());
            String pct = "%+." + (digits - 1) + "g";
            out.printf(Locale.ROOT, "    bin %3d  %-8s %+.4g %% .. %+.4g %%   accepts %s .. %s (" + pct + " %% .. " + pct + " %%)%n",
                    g.bin(), g.name(), g.lowPct(), g.highPct(), SiValue.format(r.nominal() * (1 + lo / 100), unit, digits),
                    SiValue.format(r.nominal() * (1 + hi / 100), unit, digits), lo, hi);
        }
        String gates = gates(r.gates());
        out.println("  gates:" + (gates.isEmpty() ? " none" : gates));
        for (var st : r.steps()) {
            double ideal = r.partType().idealZOhm(r.nominal(), st.test().freqHz());
            out.printf(Locale.ROOT, "  then step %s: %s, %s rms, speed %s, averaging %d; gates%s (ideal |Z| there %s); a part failing it goes to"
                    + " the gate bin%n", st.name(), SiValue.format(st.test().freqHz(), "Hz"), SiValue.format(st.test().levelV(), "V"), st.test().speed(),
                    st.test().averaging(), gates(st.gates()), SiValue.format(ideal, "ohm"));
            var fx = r.contact().fixture();
            if (ideal < net.zbin.core.FixtureBounds.MARGIN * fx.shortBandOhm())
                out.printf(Locale.ROOT, "  warning: at step %s the part's |Z| (%s) is within %.0f× of the fixture's short check (%s): every part reads"
                        + " as a short there; set fixture.short_check_ohm below %s in the line config%n", st.name(), SiValue.format(ideal, "ohm"),
                        net.zbin.core.FixtureBounds.MARGIN, SiValue.format(fx.shortBandOhm(), "ohm"), SiValue.format(ideal / net.zbin.core.FixtureBounds.MARGIN, "ohm"));
        }
        out.printf(Locale.ROOT, "  plausible phase: %.4g° .. %.4g° (outside: phase-implausible, gate bin)%n",
                r.plausible().minDeg(), r.plausible().maxDeg());
        var rb = r.reject();
        out.printf(Locale.ROOT, "  reject bins: low %d, high %d, gate %d, contact %d, short %d, overload %d, fault %d, guard band %s%n",
                rb.low(), rb.high(), rb.gate(), rb.contact(), rb.shortBin(), rb.overload(), rb.fault(),
                rb.guard() >= 0 ? String.valueOf(rb.guard()) : "low/high by side");
        out.printf(Locale.ROOT, "  retest: an unclean reading is sent back up to %d time(s) via bin %d, then rejected%n",
                r.retest().count(), r.retest().bin());
        if (r.remeasure().on()) {
            StringBuilder u = new StringBuilder();
            for (int n = 1; n <= r.remeasure().maxReadings(); n++)
                u.append(n == 1 ? "" : ", ").append(String.format(Locale.ROOT, "%d: %.4g %%", n, r.guard().uncertaintyPct(n)));
            out.printf(Locale.ROOT, "  re-measure: a value within %.4g points of an acceptance limit (or in a guard zone) is read up to %d times"
                    + " while the deadline allows, and decided on the mean; the guard of a mean of n readings (n: U) %s%n",
                    r.remeasure().nearPct(), r.remeasure().maxReadings(), u);
        }
        double ideal = r.idealZOhm();
        var c = r.contact();
        out.printf(Locale.ROOT, "  contacts: open when %s is above %s (%.4g × ideal |Z| %s) or the reading is the fixture's open;"
                        + " short when |Z| is below %s (%.4g ×) or the reading is the fixture's short%n",
                r.partType() == net.zbin.core.PartType.RESISTOR ? "|Z|" : "|X|", SiValue.format(c.openFactor() * ideal, "ohm"),
                c.openFactor(), SiValue.format(ideal, "ohm"), SiValue.format(c.shortFactor() * ideal, "ohm"), c.shortFactor());
        out.printf(Locale.ROOT, "  compensation: %s%n", compensation(r, fixtureSource));
        monitor(out, r.monitor());
        if (r.unreachable() != null) out.printf(Locale.ROOT, "  warning: no part can pass: %s%n", r.unreachable());
        if (r.modelWarning() != null) out.printf(Locale.ROOT, "  warning: model: %s%n", r.modelWarning());
    }

    /** The drift charts: their budget, limits, in-control run lengths in parts and hours, and how fast they catch the stated shift. */
    static void monitor(PrintWriter out, net.zbin.core.MonitorSettings m) {
        var d = m.design();
        int n = m.subgroup();
        double partsPerH = m.partsPerS() * 3600;
        out.printf(Locale.ROOT, "  drift monitor: budget %s false alarm(s) per %s h shift at %s parts/s, all 4 charts together"
                        + " (value and loss, EWMA and CUSUM each); points are means of %d parts; baseline from the first %d parts%s%n",
                num(m.falseAlarmsPerShift()), num(m.shiftH()), num(m.partsPerS()), n, m.learnParts(),
                m.statedBaseline() ? " (value baseline stated by the recipe)" : "");
        out.printf(Locale.ROOT, "    CUSUM k %.3f h %.3f%s: in-control ARL %s points = %s parts = %s h at the stated rate%n", d.k(), d.h(),
                d.designedH() ? " (h from the budget)" : " (stated)", big(d.cusumArl0()), big(d.cusumArl0() * n), hours(d.cusumArl0() * n / partsPerH));
        out.printf(Locale.ROOT, "    EWMA λ %.3f L %.3f%s: in-control ARL %s points = %s parts = %s h at the stated rate%n", d.lambda(), d.limitL(),
                d.designedL() ? " (L from the budget)" : " (stated)", big(d.ewmaArl0()), big(d.ewmaArl0() * n), hours(d.ewmaArl0() * n / partsPerH));
        out.printf(Locale.ROOT, "    expected false drift alarms per shift, all charts, with the learned baseline's error: %.3g (budget %s)%s%n",
                d.falseAlarmsPerShift(), num(m.falseAlarmsPerShift()), d.falseAlarmsPerShift() > m.falseAlarmsPerShift() * 1.01
                        ? " — OVER BUDGET: the stated limits are too tight for this rate" : "");
        out.printf(Locale.ROOT, "    a shift of %s σ of the parts is caught after about %s parts (CUSUM ARL %.3g points, EWMA %.3g)%n",
                num(m.detectShiftSigma()), big(d.partsToSignal(m.detectShiftSigma(), n)), d.cusumArlShift(), d.ewmaArlShift());
    }

    private static String num(double v) {
        return new java.math.BigDecimal(v).round(new java.math.MathContext(4)).stripTrailingZeros().toPlainString();
    }

    private static String big(double v) { return v >= 1e6 ? String.format(Locale.ROOT, "%.3g", v) : String.format(Locale.ROOT, "%,.0f", v); }

    private static String hours(double h) { return String.format(Locale.ROOT, "%.3g", h); }

    /** Significant digits that show the tightest grade's guarded limits apart from the nominal. */
    static int digits(Recipe r) {
        double tightest = Double.MAX_VALUE;
        for (Grade g : r.grades()) tightest = Math.min(tightest, Math.min(Math.abs(g.acceptLowPct(r.guard())), Math.abs(g.acceptHighPct(r.guard()))));
        if (!(tightest > 0)) tightest = 1e-3;
        int d = (int) Math.ceil(-Math.log10(tightest / 100)) + 2;
        return Math.max(4, Math.min(9, d));
    }

    static String modelWhy(Recipe r) {
        ModelPolicy.Choice c = r.modelChoice();
        String z = SiValue.format(r.idealZOhm(), "ohm");
        if (c.reason().startsWith("primary-")) return "the recipe grades " + r.primaryParam().label() + ", a " + c.model().key() + " parameter";
        return switch (c.reason()) {
            case "forced-series", "forced-parallel" -> "model.mode is " + c.model().key();
            case "low-z-series" -> "the nominal reads " + z + " at the test frequency, below " + SiValue.format(r.model().seriesBelowOhm(), "ohm");
            case "high-z-parallel" -> "the nominal reads " + z + " at the test frequency, above " + SiValue.format(r.model().parallelAboveOhm(), "ohm");
            default -> "the nominal reads " + z + " at the test frequency, in the mid range, where " + r.partType().key()
                    + "s are graded " + c.model().key();
        } + " (resolved once for the recipe, not per reading)";
    }

    private static String compensation(Recipe r, String fixtureSource) {
        StringBuilder s = new StringBuilder(r.compensationRequired() ? "required by the recipe" : "used when present");
        boolean open = r.needsOpenCompensation(), shortZ = r.needsShortCompensation();
        if (open || shortZ) {
            var f = r.contact().fixture();
            s.append("; nothing is graded without ").append(open && shortZ ? "open and short" : open ? "open" : "short")
                    .append(" compensation: the nominal (").append(SiValue.format(r.idealZOhm(), "ohm")).append(") is within ")
                    .append(String.format(Locale.ROOT, "%.0f×", net.zbin.core.FixtureBounds.MARGIN)).append(" of what the bare fixture may read (");
            if (open) s.append("open from ").append(SiValue.format(f.openZOhm(r.freqHz()), "ohm"))
                    .append(", i.e. up to ").append(SiValue.format(f.openMaxF(), "F")).append(" of stray");
            if (open && shortZ) s.append("; ");
            if (shortZ) s.append("short up to ").append(SiValue.format(f.shortMaxOhm(), "ohm"));
            s.append(", ").append(fixtureSource).append(")");
        }
        return s.toString();
    }
}
