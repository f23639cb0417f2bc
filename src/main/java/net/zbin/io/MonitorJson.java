package net.zbin.io;

import com.fasterxml.jackson.databind.node.ObjectNode;
import net.zbin.core.DriftChart;
import net.zbin.core.LineMonitor;

/**
 * The line monitor's figures as JSON, the same for the dashboard and for {@code replay --json}: capability
 * of the lot, the drift charts against their limits, the rolling window, the compensation state and the
 * active monitor alarms. Rounded for people (4 significant digits); the record log keeps full precision.
 */
public final class MonitorJson {
    private MonitorJson() {}

    public static ObjectNode encode(LineMonitor.Snapshot s) {
        ObjectNode n = Json.object();
        n.put("parts", s.parts());
        r(n, "dev_mean_pct", s.devMeanPct());
        r(n, "dev_sigma_pct", s.devSigmaPct());
        r(n, "cp", s.cp());
        r(n, "cpk", s.cpk());
        n.set("value_drift", chart(s.value()));
        n.set("loss_drift", chart(s.loss()).put("quantity", s.lossName()));
        var w = s.window();
        ObjectNode win = n.putObject("window");
        win.put("presentations", w.presentations());
        r(win, "yield_pct", w.yieldPct());
        r(win, "retest_pct", w.retestPct());
        r(win, "open_contact_pct", w.openContactPct());
        r(win, "short_pct", w.shortPct());
        r(win, "fault_pct", w.faultPct());
        r(win, "negative_r_pct", w.negativeRPct());
        n.put("cause", s.cause().name().toLowerCase(java.util.Locale.ROOT));
        n.put("cause_text", s.causeText());
        ObjectNode c = n.putObject("compensation");
        c.put("source", s.compSource());
        r(c, "age_h", s.compAgeH());
        r(c, "freq_hz", s.compFreqHz());
        r(c, "open_residual_pf", s.openResidualF() * 1e12);
        r(c, "open_residual_g_ns", s.openResidualGS() * 1e9);
        r(c, "short_residual_mohm", s.shortResidualOhm() * 1e3);
        r(c, "short_residual_nh", s.shortResidualH() * 1e9);
        r(c, "reference_offset_pct", s.referenceOffsetPct());
        ObjectNode a = n.putObject("alarms");
        s.active().forEach((code, msg) -> a.put(code.code(), msg));
        return n;
    }

    private static ObjectNode chart(DriftChart.View v) {
        ObjectNode n = Json.object();
        n.put("learning", v.learning());
        n.put("learned", v.learned());
        n.put("learn_parts", v.learnParts());
        n.put("state", v.learning() ? "learning (" + v.learned() + " of " + v.learnParts() + " parts)" : v.alarm() ? "alarm" : "in control");
        if (v.learning()) {
            n.put("signals", v.signals());
            n.put("alarm", false);
            return n;
        }
        r(n, "baseline_mean", v.baselineMean());
        r(n, "baseline_sigma", v.baselineSigma());
        r(n, "sigma_point", v.sigmaPoint());
        r(n, "ewma", v.ewma());
        r(n, "ewma_limit", v.ewmaLimit());
        r(n, "cusum_high", v.cusumHigh());
        r(n, "cusum_low", v.cusumLow());
        r(n, "cusum_h", v.cusumH());
        r(n, "shift", v.shift());
        n.put("alarm", v.alarm());
        n.put("signals", v.signals());
        return n;
    }

    /** Four significant digits (a rounding for people), or null when not finite. */
    static void r(ObjectNode n, String key, double v) {
        if (!Double.isFinite(v) || v == 0) {
            Json.num(n, key, v);
            return;
        }
        Json.num(n, key, new java.math.BigDecimal(v).round(new java.math.MathContext(4)).doubleValue());
    }
}
