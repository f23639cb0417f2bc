package net.zbin.app;

import java.io.PrintWriter;
import java.util.Locale;
import net.zbin.core.LineMonitor;

/** The line monitor's figures for people: the same lines at the end of a demo and of a replay. */
final class MonitorText {
    private MonitorText() {}

    static void figures(PrintWriter out, LineMonitor.Snapshot m) {
        out.printf(Locale.ROOT, "  monitor: deviation mean %+.4f %%, σ %.4f %%, Cp %.3g, Cpk %.3g over %d graded parts%n",
                m.devMeanPct(), m.devSigmaPct(), m.cp(), m.cpk(), m.parts());
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
        out.printf(Locale.ROOT, "    last %d presentations: yield %.2f %%, retests %.2f %%, open contact %.2f %%, short %.2f %%, fault %.2f %%, negative R %.2f %%%n",
                w.presentations(), w.yieldPct(), w.retestPct(), w.openContactPct(), w.shortPct(), w.faultPct(), w.negativeRPct());
        if (Double.isFinite(m.openResidualF()) || Double.isFinite(m.shortResidualOhm()))
            out.printf(Locale.ROOT, "    fixture checks: open residual %.3f pF, short residual %.2f mΩ / %.2f nH%n", m.openResidualF() * 1e12,
                    m.shortResidualOhm() * 1e3, m.shortResidualH() * 1e9);
        if (!m.causeText().isEmpty()) out.println("    population check: " + m.causeText());
    }

    private static String state(net.zbin.core.DriftChart.View v) {
        return v.alarm() ? "ALARM" : "in control";
    }

    static String learning(net.zbin.core.DriftChart.View v) {
        return "learning (" + v.learned() + " of " + v.learnParts() + " parts)";
    }
}
