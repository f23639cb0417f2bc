package net.zbin.app.daemon;

import com.fasterxml.jackson.databind.node.ObjectNode;
import net.zbin.io.Json;
import net.zbin.io.TallyJson;
import net.zbin.io.mqtt.Payloads;

/** The retained dashboard payload: rolling figures of the line since the last counter reset. */
final class DashboardJson {
    private DashboardJson() {}

    static byte[] encode(String line, String lot, String recipe, Mode mode, LineStats.Snapshot s, long recordBacklog,
                         long recordDropped) {
        ObjectNode n = Json.object();
        n.put("line", line);
        n.put("lot", lot);
        n.put("recipe", recipe);
        n.put("mode", mode.key());
        n.put("total", s.tally().total());
        n.put("passed", s.tally().passed());
        Json.num(n, "yield_pct", s.tally().yieldPct());
        Json.num(n, "yield_low_pct", s.yieldLowPct());
        Json.num(n, "yield_high_pct", s.yieldHighPct());
        Json.num(n, "uph", s.uph());
        TallyJson.put(n, s.tally());
        ObjectNode lat = n.putObject("latency_ms");
        Json.num(lat, "p50", s.p50Ms());
        Json.num(lat, "p99", s.p99Ms());
        Json.num(lat, "max", s.maxMs());
        n.put("late", s.late());
        n.put("repeats", s.repeats());
        n.put("rejected", s.rejected());
        n.put("record_backlog", recordBacklog);
        n.put("record_dropped", recordDropped);
        n.put("since", s.since().toString());
        return Payloads.bytes(n);
    }
}
