package net.zbin.io;

import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import net.zbin.core.BinTally;

/** Bin counts and reasons as JSON, the same on the dashboard and in {@code zbin replay --json}. */
public final class TallyJson {
    private TallyJson() {}

    /**
     * Adds {@code parts, passed, yield_pct, retests, presentations, fixture_checks, bins: [{bin, grade,
     * verdict, count, pct}]} (final decisions), {@code reasons: {code: n}} (final decisions) and
     * {@code retest_reasons} to n.
     */
    public static void put(ObjectNode n, BinTally.Snapshot s) {
        n.put("parts", s.parts());
        n.put("passed", s.passed());
        Json.num(n, "yield_pct", s.yieldPct());
        n.put("retests", s.retests());
        n.put("presentations", s.presentations());
        n.put("fixture_checks", s.checks());
        ArrayNode bins = n.putArray("bins");
        for (BinTally.BinCount b : s.bins()) {
            ObjectNode o = bins.addObject();
            o.put("bin", b.bin());
            o.put("grade", b.grade());
            o.put("verdict", b.verdict().key());
            o.put("count", b.count());
            o.put("pct", Math.round(b.pct() * 100) / 100.0); // for people: 0.01 %
        }
        ObjectNode reasons = n.putObject("reasons");
        s.reasons().forEach((k, v) -> reasons.put(k.code(), v));
        ObjectNode interim = n.putObject("retest_reasons");
        s.retestReasons().forEach((k, v) -> interim.put(k.code(), v));
    }
}
