package net.zbin.app.daemon;

import com.fasterxml.jackson.databind.node.ObjectNode;
import net.zbin.core.Wilson;
import net.zbin.io.Json;
import net.zbin.io.TallyJson;

/**
 * The retained dashboard payload: the lot's figures (since it started, or since reset-counters),
 * throughput, latency and the health of the line. Numbers for people are rounded (percentages to
 * 0.01, UPH to whole parts, milliseconds to 0.01); the record log keeps full precision.
 */
final class DashboardJson {
    private DashboardJson() {}

    static ObjectNode encode(LineSnapshot snap) {
        LineStats.Snapshot s = snap.stats();
        String line = snap.line(), recipe = snap.recipe();
        Mode mode = snap.mode();
        ObjectNode n = Json.object();
        n.put("line", line);
        n.put("lot", s.lot());
        n.put("recipe", recipe);
        n.put("mode", mode.key());
        n.put("online", mode != Mode.OFFLINE);
        TallyJson.put(n, s.lotTally());
        round(n, "yield_pct", s.lotTally().yieldPct(), 100);
        round(n, "yield_low_pct", s.yieldLowPct(), 100);
        round(n, "yield_high_pct", s.yieldHighPct(), 100);
        round(n, "uph", s.uphMinute(), 1);
        round(n, "uph_hour", s.uphHour(), 1);
        window(n.putObject("last_10_min"), s.window10Min());
        window(n.putObject("last_hour"), s.windowHour());
        ObjectNode lat = n.putObject("latency_ms");
        round(lat, "p50", s.p50Ms(), 100);
        round(lat, "p99", s.p99Ms(), 100);
        round(lat, "max", s.maxMs(), 100);
        n.put("late", s.late());
        n.put("repeats", s.repeats());
        n.put("messages_rejected", s.rejected()); // unusable MQTT messages refused (not parts: those are in bins)
        n.put("seq_reused", s.reusedSeqs());
        n.put("busy", s.busy());
        n.put("decisions", s.decisions());
        n.putArray("alarms").addAll(snap.alarms().keySet().stream().map(net.zbin.core.AlarmCode::code).sorted().map(a -> Json.mapper().getNodeFactory().textNode(a)).toList());
        var detail = n.putArray("active_alarms"); // the same alarms with their messages and acknowledgements, oldest first
        snap.alarms().values().stream().sorted(java.util.Comparator.comparing(LineMode.Alarm::since).thenComparing(a -> a.code().code()))
                .forEach(a -> {
                    ObjectNode x = detail.addObject();
                    x.put("code", a.code().code());
                    x.put("severity", a.code().severity().key());
                    x.put("message", a.message());
                    x.put("since", a.since().toString());
                    if (a.ack() != null) x.putObject("acknowledged").put("by", a.ack().by()).put("at", a.ack().at().toString()).put("note", a.ack().note());
                });
        n.put("meter_link", snap.meterLink());
        n.put("deadline_ms", snap.deadlineMs());
        n.put("at", snap.at().toString());
        n.put("record_backlog", snap.recordBacklog());
        n.put("record_dropped", snap.recordDropped());
        n.put("mqtt_buffered", snap.mqttBuffered());
        n.put("since", s.lotSince().toString());
        n.set("monitor", net.zbin.io.MonitorJson.encode(snap.monitor()));
        return n;
    }

    /** Parts finished and passed in a rolling time window, with the yield and its Wilson 95 % interval. */
    private static void window(ObjectNode n, LineStats.Window w) {
        n.put("parts", w.parts());
        n.put("passed", w.passed());
        double[] ci = Wilson.interval(w.passed(), w.parts(), Wilson.Z95);
        round(n, "yield_pct", w.parts() == 0 ? Double.NaN : 100.0 * w.passed() / w.parts(), 100);
        round(n, "yield_low_pct", ci[0] * 100, 100);
        round(n, "yield_high_pct", ci[1] * 100, 100);
    }

    private static void round(ObjectNode n, String key, double v, double per) {
        Json.num(n, key, Double.isFinite(v) ? Math.round(v * per) / per : v);
    }
}
