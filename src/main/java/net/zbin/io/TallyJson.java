package net.zbin.io;

import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import net.zbin.core.BinTally;

/** Bin counts and reasons as JSON, the same on the dashboard and in {@code zbin replay --json}. */
public final class TallyJson {
    private TallyJson() {}

    /** Adds {@code bins: [{bin, grade, verdict, count, pct}]} and {@code reasons: {code: n}} to n. */
    public static void put(ObjectNode n, BinTally.Snapshot s) {
        ArrayNode bins = n.putArray("bins");
        for (BinTally.BinCount b : s.bins()) {
            ObjectNode o = bins.addObject();
            o.put("bin", b.bin());
            o.put("grade", b.grade());
            o.put("verdict", b.verdict().key());
            o.put("count", b.count());
            o.put("pct", b.pct());
        }
        ObjectNode reasons = n.putObject("reasons");
        s.reasons().forEach(reasons::put);
    }
}
