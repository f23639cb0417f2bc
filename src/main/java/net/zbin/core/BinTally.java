package net.zbin.core;

import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * Counts decisions so that every view of a lot — the dashboard, the demo summary and {@code replay} —
 * gives the same yield. A part's outcome is its final decision (pass or fail, after its retests);
 * interim retest decisions (and parts not measured because the line was paused, faulted or busy) are
 * counted as retests, fixture checks as checks; yield = parts passed / parts finished.
 *
 * <p>Single owner, mutable, counts only grow; {@link #snapshot()} gives the immutable view readers use,
 * and "since reset" or a window is {@code later.minus(earlier)}.
 */
public final class BinTally {
    private final Map<BinKey, long[]> bins = new TreeMap<>(Comparator.comparingInt(BinKey::bin)
            .thenComparing(BinKey::grade).thenComparing(BinKey::verdict));
    private final Map<Reason, long[]> reasons = new TreeMap<>(BY_CODE);
    private final Map<Reason, long[]> retestReasons = new TreeMap<>(BY_CODE);

    /** Reasons in the alphabetical order of their codes, as people read them. */
    private static final Comparator<Reason> BY_CODE = Comparator.comparing(Reason::code);
    private long parts, passed, retests, checks, checksPassed;

    public record BinKey(int bin, String grade, Verdict verdict) {}

    public record BinCount(int bin, String grade, Verdict verdict, long count, double pct) {}

    /**
     * @param parts         parts finished (final decision pass or fail)
     * @param passed        parts whose final decision was pass
     * @param retests       interim decisions (retest verdicts, parts not measured)
     * @param checks        open/short/reference check presentations
     * @param checksPassed  checks that passed
     * @param bins          final decisions per bin/grade/verdict, by bin number
     * @param reasons       final decisions per reason, alphabetical by code
     * @param retestReasons interim decisions per reason
     */
    public record Snapshot(long parts, long passed, long retests, long checks, long checksPassed, List<BinCount> bins,
                           Map<Reason, Long> reasons, Map<Reason, Long> retestReasons) {
        public static final Snapshot EMPTY = new Snapshot(0, 0, 0, 0, 0, List.of(), Map.of(), Map.of());

        /** Pass share of finished parts in percent, NaN when none finished. */
        public double yieldPct() { return parts == 0 ? Double.NaN : 100.0 * passed / parts; }

        /** Presentations of parts: finished parts plus interim decisions. */
        public long presentations() { return parts + retests; }

        /** The counts since {@code earlier}, a snapshot of the same tally taken before this one. */
        public Snapshot minus(Snapshot earlier) {
            Map<BinKey, Long> b = new TreeMap<>(Comparator.comparingInt(BinKey::bin).thenComparing(BinKey::grade)
                    .thenComparing(BinKey::verdict));
            for (BinCount c : bins) b.merge(new BinKey(c.bin(), c.grade(), c.verdict()), c.count(), Long::sum);
            for (BinCount c : earlier.bins) b.merge(new BinKey(c.bin(), c.grade(), c.verdict()), -c.count(), Long::sum);
            long p = parts - earlier.parts;
            List<BinCount> out = b.entrySet().stream().filter(e -> e.getValue() != 0)
                    .map(e -> new BinCount(e.getKey().bin(), e.getKey().grade(), e.getKey().verdict(), e.getValue(),
                            p == 0 ? 0 : 100.0 * e.getValue() / p)).toList();
            return new Snapshot(p, passed - earlier.passed, retests - earlier.retests, checks - earlier.checks,
                    checksPassed - earlier.checksPassed, out, diff(reasons, earlier.reasons), diff(retestReasons, earlier.retestReasons));
        }

        private static Map<Reason, Long> diff(Map<Reason, Long> a, Map<Reason, Long> b) {
            Map<Reason, Long> out = new TreeMap<>(BY_CODE);
            out.putAll(a);
            b.forEach((k, v) -> out.merge(k, -v, Long::sum));
            out.values().removeIf(v -> v == 0);
            return java.util.Collections.unmodifiableMap(new LinkedHashMap<>(out));
        }
    }

    /** Counts one decision; {@code part} false for an open, short or reference check presentation. */
    public void add(Grading g, boolean part) {
        if (!part) {
            addCheck(g.verdict() == Verdict.PASS);
            return;
        }
        if (g.verdict() == Verdict.RETEST) {
            retests++;
            retestReasons.computeIfAbsent(g.reason(), k -> new long[1])[0]++;
            return;
        }
        parts++;
        if (g.verdict() == Verdict.PASS) passed++;
        bins.computeIfAbsent(new BinKey(g.bin(), g.grade(), g.verdict()), k -> new long[1])[0]++;
        reasons.computeIfAbsent(g.reason(), k -> new long[1])[0]++;
    }

    /** Counts n finished parts of one outcome at once (a sweep's counting by value). */
    public void addFinished(int bin, String grade, Verdict verdict, Reason reason, long n) {
        if (n <= 0) return;
        parts += n;
        if (verdict == Verdict.PASS) passed += n;
        bins.computeIfAbsent(new BinKey(bin, grade, verdict), k -> new long[1])[0] += n;
        reasons.computeIfAbsent(reason, k -> new long[1])[0] += n;
    }

    /** A copy with the same counts. */
    public BinTally copy() {
        BinTally t = new BinTally();
        bins.forEach((k, v) -> t.bins.put(k, new long[] {v[0]}));
        reasons.forEach((k, v) -> t.reasons.put(k, new long[] {v[0]}));
        retestReasons.forEach((k, v) -> t.retestReasons.put(k, new long[] {v[0]}));
        t.parts = parts;
        t.passed = passed;
        t.retests = retests;
        t.checks = checks;
        t.checksPassed = checksPassed;
        return t;
    }

    /** Takes up the counts of {@code s} in place of this tally's (a snapshot taken before a restart of the daemon). */
    public void restore(Snapshot s) {
        bins.clear();
        reasons.clear();
        retestReasons.clear();
        for (BinCount c : s.bins()) bins.put(new BinKey(c.bin(), c.grade(), c.verdict()), new long[] {c.count()});
        s.reasons().forEach((k, v) -> reasons.put(k, new long[] {v}));
        s.retestReasons().forEach((k, v) -> retestReasons.put(k, new long[] {v}));
        parts = s.parts();
        passed = s.passed();
        retests = s.retests();
        checks = s.checks();
        checksPassed = s.checksPassed();
    }

    /** Counts one open, short or reference check presentation. */
    public void addCheck(boolean passed) {
        checks++;
        if (passed) checksPassed++;
    }

    public Snapshot snapshot() {
        List<BinCount> b = bins.entrySet().stream().map(e -> new BinCount(e.getKey().bin(), e.getKey().grade(),
                e.getKey().verdict(), e.getValue()[0], parts == 0 ? 0 : 100.0 * e.getValue()[0] / parts)).toList();
        return new Snapshot(parts, passed, retests, checks, checksPassed, b, copy(reasons), copy(retestReasons));
    }

    private static Map<Reason, Long> copy(Map<Reason, long[]> m) {
        Map<Reason, Long> r = new LinkedHashMap<>();
        m.forEach((k, v) -> r.put(k, v[0]));
        return java.util.Collections.unmodifiableMap(r);
    }
}
