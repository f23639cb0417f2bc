package net.zbin.core;

import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * Counts gradings per (bin, grade, verdict) and per reason. Single owner, mutable; {@link #snapshot()}
 * gives the immutable view readers use.
 */
public final class BinTally {
    private final Map<BinKey, long[]> bins = new TreeMap<>(Comparator.comparingInt(BinKey::bin)
            .thenComparing(BinKey::grade).thenComparing(BinKey::verdict));
    private final Map<String, long[]> reasons = new TreeMap<>();
    private long total;
    private long passed;

    public record BinKey(int bin, String grade, Verdict verdict) {}

    public record BinCount(int bin, String grade, Verdict verdict, long count, double pct) {}

    /**
     * @param total    gradings counted
     * @param passed   gradings with verdict pass
     * @param bins     counts per bin/grade/verdict, by bin number
     * @param reasons  counts per reason code, alphabetical
     */
    public record Snapshot(long total, long passed, List<BinCount> bins, Map<String, Long> reasons) {
        /** Pass share in percent, NaN when nothing was counted. */
        public double yieldPct() { return total == 0 ? Double.NaN : 100.0 * passed / total; }
    }

    public void add(Grading g) {
        total++;
        if (g.verdict() == Verdict.PASS) passed++;
        bins.computeIfAbsent(new BinKey(g.bin(), g.grade(), g.verdict()), k -> new long[1])[0]++;
        reasons.computeIfAbsent(g.reason(), k -> new long[1])[0]++;
    }

    public void reset() {
        bins.clear();
        reasons.clear();
        total = 0;
        passed = 0;
    }

    public Snapshot snapshot() {
        List<BinCount> b = bins.entrySet().stream().map(e -> new BinCount(e.getKey().bin(), e.getKey().grade(),
                e.getKey().verdict(), e.getValue()[0], total == 0 ? 0 : 100.0 * e.getValue()[0] / total)).toList();
        Map<String, Long> r = new LinkedHashMap<>();
        reasons.forEach((k, v) -> r.put(k, v[0]));
        return new Snapshot(total, passed, b, java.util.Collections.unmodifiableMap(r));
    }
}
