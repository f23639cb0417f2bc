package net.zbin.app.status;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.time.Instant;
import net.zbin.io.Json;

/**
 * One dashboard's figures as a point of the page's trend charts. A drift chart's EWMA is standardized by the σ of a
 * chart point; the point carries it back in the quantity's own unit (baseline + EWMA × σ, limits baseline ± L × σ), so
 * the page draws value and loss against their limits around the baseline.
 */
final class TrendPoint {
    private TrendPoint() {}

    static ObjectNode of(JsonNode d, Instant heard) {
        ObjectNode p = Json.object();
        p.put("t", d.hasNonNull("at") ? d.get("at").asText() : heard.toString());
        copy(d, p, "yield_pct", "yield_pct");
        copy(d.path("last_10_min"), p, "yield_pct", "yield_10_min_pct");
        copy(d, p, "uph", "uph");
        copy(d.path("latency_ms"), p, "p50", "p50_ms");
        copy(d.path("latency_ms"), p, "p99", "p99_ms");
        JsonNode m = d.path("monitor");
        chart(m.path("value_drift"), p, "value");
        chart(m.path("loss_drift"), p, "loss");
        JsonNode c = m.path("compensation");
        copy(c, p, "open_residual_pf", "open_pf");
        copy(c, p, "short_residual_mohm", "short_mohm");
        copy(c, p, "age_h", "comp_age_h");
        return p;
    }

    private static void chart(JsonNode chart, ObjectNode p, String key) {
        if (chart.path("learning").asBoolean(true) || !chart.path("baseline_mean").isNumber()) return;
        double base = chart.get("baseline_mean").asDouble(), sigma = chart.path("sigma_point").asDouble(Double.NaN),
                ewma = chart.path("ewma").asDouble(Double.NaN), limit = chart.path("ewma_limit").asDouble(Double.NaN);
        if (!Double.isFinite(sigma) || !Double.isFinite(ewma) || !Double.isFinite(limit)) return;
        ObjectNode c = p.putObject(key);
        Json.num(c, "base", base);
        Json.num(c, "ewma", base + ewma * sigma);
        Json.num(c, "low", base - limit * sigma);
        Json.num(c, "high", base + limit * sigma);
        c.put("alarm", chart.path("alarm").asBoolean(false));
    }

    private static void copy(JsonNode from, ObjectNode to, String key, String as) {
        JsonNode v = from.get(key);
        if (v != null && v.isNumber()) to.set(as, v);
    }
}
