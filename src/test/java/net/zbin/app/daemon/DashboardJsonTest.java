package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;

import java.nio.file.Path;
import java.time.Instant;
import java.util.Map;
import net.zbin.core.AlarmCode;
import net.zbin.core.FixtureCheck;
import net.zbin.core.LineEngine;
import net.zbin.io.RecipeLoader;
import org.junit.jupiter.api.Test;

/** The dashboard lists the active alarms with their acknowledgements, the meter link, the deadline and its time stamp. */
class DashboardJsonTest {
    @Test
    void activeAlarms_carryWhoAcknowledgedThem_oldestFirst() throws Exception {
        var r = RecipeLoader.load(Path.of("config/recipes/mlcc-x7r-100n.yaml"));
        Instant t0 = Instant.parse("2026-12-01T08:00:00Z");
        var drift = new LineMode.Alarm(AlarmCode.VALUE_DRIFT, "Cs drifted", t0.plusSeconds(60),
                new LineMode.Ack("r.okafor", t0.plusSeconds(90), "fixture cleaned"));
        var link = new LineMode.Alarm(AlarmCode.METER_LINK_DOWN, "no answer", t0, null);
        var snap = new LineSnapshot(t0.plusSeconds(120), "l1", r.name(), Mode.FAULT, new LineStats(java.time.Clock.systemUTC(), 150).snapshot(),
                new LineEngine(r, r.monitor(), FixtureCheck.Limits.DEFAULT).snapshot(t0), Map.of(AlarmCode.VALUE_DRIFT, drift,
                AlarmCode.METER_LINK_DOWN, link), 0, 0, 0, "down", 150);
        var n = DashboardJson.encode(snap);
        var list = n.path("active_alarms");
        assertEquals(2, list.size());
        assertEquals("meter-link-down", list.get(0).path("code").asText(), "oldest first");
        assertFalse(list.get(0).has("acknowledged"));
        assertEquals("value-drift", list.get(1).path("code").asText());
        assertEquals("r.okafor", list.get(1).path("acknowledged").path("by").asText());
        assertEquals("2026-12-01T08:01:30Z", list.get(1).path("acknowledged").path("at").asText());
        assertEquals("fixture cleaned", list.get(1).path("acknowledged").path("note").asText());
        assertEquals("down", n.path("meter_link").asText());
        assertEquals(150, n.path("deadline_ms").asInt());
        assertEquals("2026-12-01T08:02:00Z", n.path("at").asText());
    }
}
