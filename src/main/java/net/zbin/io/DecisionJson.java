package net.zbin.io;

import com.fasterxml.jackson.databind.node.ObjectNode;
import net.zbin.core.Decision;
import net.zbin.core.Grading;

/** The decision payload of the MQTT contract (contract, see the README's MQTT table); also the {@code decision} of {@code zbin calc}. */
public final class DecisionJson {
    private DecisionJson() {}

    public static ObjectNode encode(Decision d) {
        Grading g = d.grading();
        ObjectNode n = Json.object();
        if (d.seq() >= 0) n.put("seq", d.seq());
        else n.putNull("seq");
        Json.str(n, "part", d.part());
        Json.str(n, "lot", d.lot());
        Json.str(n, "kind", d.kind());
        n.put("bin", g.bin());
        n.put("grade", g.grade());
        n.put("verdict", g.verdict().key());
        n.put("reason", g.reason());
        Json.str(n, "recipe", d.recipe());
        Json.str(n, "model", g.model() == null ? null : g.model().key());
        Json.str(n, "param", g.param() == null ? null : g.param().label());
        Json.num(n, "value", g.value());
        Json.str(n, "unit", g.unit());
        Json.num(n, "dev_pct", g.devPct());
        Json.num(n, "d", g.d());
        Json.num(n, "q", g.q());
        Json.num(n, "esr_ohm", g.esrOhm());
        Json.num(n, "theta_deg", g.thetaDeg());
        Json.num(n, "z_ohm", g.zOhm());
        Json.num(n, "freq_hz", g.freqHz());
        Json.num(n, "r_ohm", g.rOhm());
        Json.num(n, "x_ohm", g.xOhm());
        Json.num(n, "raw_r_ohm", g.rawROhm());
        Json.num(n, "raw_x_ohm", g.rawXOhm());
        n.put("comp", g.comp().key());
        Json.num(n, "latency_ms", d.latencyMs());
        n.put("repeat", d.repeat());
        n.put("attempt", d.attempt());
        return n;
    }
}
