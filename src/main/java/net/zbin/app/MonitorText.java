package net.zbin.app;

import java.io.PrintWriter;
import java.util.Locale;
import net.zbin.app.report.Shown;
import net.zbin.core.LineMonitor;

/** The line monitor's figures for people: the same lines at the end of a demo and of a replay. */
final class MonitorText {
    private MonitorText() {}

    static void figures(PrintWriter out, LineMonitor.Snapshot m) {
        out.printf(Locale.ROOT, "  monitor: deviation mean %s, σ %s, Cp %s, Cpk %s over %d graded parts%n", Shown.of("%+.4f %%", m.devMeanPct()),
                Shown.of("%.4f %%", m.devSigmaPct()), Shown.of("%.3g", m.cp()), Shown.of("%.3g", m.cpk()), m.parts());
        var v = m.value();
        if (v.learning()) out.printf(Locale.ROOT, "    value drift: %s%n", learning(v));
        else out.printf(Locale.ROOT, "    value drift: %s; baseline %+.4f %% σ %.4f %% (a point: %.4f %%); EWMA %+.3f (limit ±%.3f), CUSUM %.2f / %.2f (h %.2f), %d signals%n",
                state(v), v.baselineMean(), v.baselineSigma(), v.sigmaPoint(), v.ewma(), v.ewmaLimit(), v.cusumHigh(), v.cusumLow(), v.cusumH(),
                v.signals());
        var l = m.loss();
        if (l.learning()) out.printf(Locale.ROOT, "    %s drift: %s%n", m.lossName(), learning(l));
        else out.printf(Locale.ROOT, "    %s drift: %s; baseline %.4g σ %.4g, %d signals%n", m.lossName(), state(l), l.baselineMean(),
                l.baselineSigma(), l.signals());
        var w = m.window();
        out.printf(Locale.ROOT, "    last %d presentations: yield %s, retests %s, open contact %s, short %s, fault %s, negative R %s%n",
                w.presentations(), pct(w.yieldPct()), pct(w.retestPct()), pct(w.openContactPct()), pct(w.shortPct()), pct(w.faultPct()), pct(w.negativeRPct()));
        if (Double.isFinite(m.openResidualF()) || Double.isFinite(m.shortResidualOhm()))
            out.printf(Locale.ROOT, "    fixture checks: open residual %.3f pF, short residual %.2f mΩ / %.2f nH%n", m.openResidualF() * 1e12,
                    m.shortResidualOhm() * 1e3, m.shortResidualH() * 1e9);
        if (!m.causeText().isEmpty()) out.println("    population check: " + m.causeText());
    }

    private static String pct(double v) { return Shown.of("%.2f %%", v); }

    private static String state(net.zbin.core.DriftChart.View v) {
        return v.alarm() ? "ALARM" : "in control";
    }

    static String learning(net.zbin.core.DriftChart.View v) {
        return "learning (" + v.learned() + " of " + v.learnParts() + " parts)";
    }
}
