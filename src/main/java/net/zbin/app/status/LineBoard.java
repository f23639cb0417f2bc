package net.zbin.app.status;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayDeque;
import java.util.Map;
import java.util.TreeMap;
import net.zbin.io.Json;

/**
 * What a status page shows of one line, built only from the line's own messages — its dashboard, state and alarm
 * payloads — so the page shows the numbers the dashboard topic carries, whether the daemon hands them over itself or a
 * plant panel hears them from the broker. Keeps the last {@link #TREND_POINTS} dashboards' figures as trends (drift
 * charts, residuals, latency, yield). Thread-safe; every method is short and never blocks on I/O.
 */
final class LineBoard {
    /** Dashboards kept for the trend charts (at the shipped 5 s interval, the last half hour). */
    static final int TREND_POINTS = 360;
    private final String line;
    private ObjectNode dashboard;
    private ObjectNode state;
    private final Map<String, ObjectNode> alarms = new TreeMap<>();
    private final ArrayDeque<ObjectNode> trend = new ArrayDeque<>();
    private Instant heard, previousDashboard;
    private Duration gap = Duration.ZERO;

    LineBoard(String line) { this.line = line; }

    String line() { return line; }

    /** A dashboard payload: the figures, a trend point, and the active alarms as the line lists them. */
    synchronized void dashboard(JsonNode d, Instant now) {
        if (!d.isObject()) return;
        dashboard = (ObjectNode) d.deepCopy();
        heard = now;
        if (previousDashboard != null) gap = Duration.between(previousDashboard, now);
        previousDashboard = now;
        JsonNode list = d.get("active_alarms");
        if (list != null && list.isArray()) {
            alarms.clear();
            for (JsonNode a : list) if (a.hasNonNull("code")) alarms.put(a.get("code").asText(), (ObjectNode) a.deepCopy());
        }
        trend.addLast(TrendPoint.of(d, now));
        while (trend.size() > TREND_POINTS) trend.removeFirst();
    }

    /** A state payload (online, mode, recipe, since). */
    synchronized void state(JsonNode s, Instant now) {
        if (!s.isObject()) return;
        state = (ObjectNode) s.deepCopy();
        heard = now;
        if (!s.path("online").asBoolean(true)) alarms.clear(); // offline: the line's alarms are not known any more
    }

    /** An alarm payload: raised, acknowledged (active with an acknowledgement) or cleared. */
    synchronized void alarm(JsonNode a, Instant now) {
        if (!a.isObject() || !a.hasNonNull("code")) return;
        heard = now;
        String code = a.get("code").asText();
        if (a.path("active").asBoolean(false)) alarms.put(code, (ObjectNode) a.deepCopy());
        else alarms.remove(code);
    }

    /** True when the line published nothing for longer than three dashboard intervals (at least 15 s). */
    synchronized boolean silent(Instant now) {
        if (heard == null) return true;
        Duration limit = gap.multipliedBy(3).compareTo(Duration.ofSeconds(15)) > 0 ? gap.multipliedBy(3) : Duration.ofSeconds(15);
        return Duration.between(heard, now).compareTo(limit) > 0;
    }

    /** Online as the line itself last said (its state message; a dashboard's flag until a state came). */
    private boolean online() {
        if (state != null) return state.path("online").asBoolean(false);
        return dashboard != null && dashboard.path("online").asBoolean(false);
    }

    /** Everything the line page draws. */
    synchronized ObjectNode view(Instant now, boolean actions) {
        ObjectNode v = summaryInto(Json.object(), now);
        v.put("actions", actions);
        if (dashboard != null) v.set("dashboard", dashboard);
        if (state != null) v.set("state", state);
        ArrayNode al = v.putArray("alarms");
        alarms.values().stream().sorted(java.util.Comparator.comparing((ObjectNode a) -> a.path("since").asText()))
                .forEach(al::add);
        ArrayNode t = v.putArray("trend");
        trend.forEach(t::add);
        return v;
    }

    /** One row of the plant overview. */
    synchronized ObjectNode summary(Instant now) { return summaryInto(Json.object(), now); }

    private ObjectNode summaryInto(ObjectNode v, Instant now) {
        v.put("line", line);
        boolean online = online();
        boolean silent = silent(now);
        v.put("online", online && !silent);
        v.put("silent", online && silent);
        String mode = state != null ? state.path("mode").asText("offline") : dashboard != null ? dashboard.path("mode").asText("offline") : "offline";
        v.put("mode", online && !silent ? mode : "offline");
        if (!online && state != null) v.put("offline_since", state.path("since").asText());
        else if (silent && heard != null) v.put("offline_since", heard.toString());
        if (heard != null) v.put("heard_at", heard.toString());
        if (dashboard != null) {
            for (String k : new String[] {"lot", "recipe", "parts", "passed", "yield_pct", "uph"}) if (dashboard.has(k)) v.set(k, dashboard.get(k));
            v.set("yield_10_min_pct", dashboard.path("last_10_min").path("yield_pct"));
        }
        if (state != null && state.hasNonNull("recipe")) v.set("recipe", state.get("recipe"));
        ArrayNode codes = v.putArray("alarm_codes");
        alarms.keySet().forEach(codes::add);
        v.put("unacknowledged", alarms.values().stream().filter(a -> !a.has("acknowledged")).count());
        return v;
    }
}
