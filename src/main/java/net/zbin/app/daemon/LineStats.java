package net.zbin.app.daemon;

import java.time.Clock;
import java.time.Instant;
import net.zbin.core.BinTally;
import net.zbin.core.Trigger;
import net.zbin.core.Verdict;
import net.zbin.core.Wilson;
import net.zbin.io.DecisionFields;
import org.HdrHistogram.Histogram;

/**
 * The line's running figures, fed as a {@link DecisionListener}. Counts only grow; the lot's figures
 * (and "since reset-counters") are the difference of the running tally and the snapshot taken when the
 * lot started or the counters were reset. Throughput is the parts finished in the last minute and the
 * last hour ({@link FinishedRing}: memory does not grow with the lot). Writers: the measuring
 * thread; reader: the dashboard thread, through {@link #snapshot}.
 */
final class LineStats implements DecisionListener {
    private final Clock clock;
    private final int deadlineMs;
    private final BinTally tally = new BinTally();
    /** µs, 2 significant digits (1 %): small enough to copy for every dashboard and at every lot end. */
    private final Histogram latencyUs = new Histogram(60_000_000L, 2);
    /** Upper bounds (ms) of the latency buckets the metrics export: common practice plus the line's deadline. */
    private final double[] bucketMs;
    private final long[] bucketCount;
    private double latencySumMs;
    private final FinishedRing finished = new FinishedRing();
    private BinTally.Snapshot base = BinTally.Snapshot.EMPTY;
    private String lot = "";
    private Instant lotSince;
    private Instant resetAt;
    private long decisions, late, repeats, rejected, reusedSeqs, busy;

    LineStats(Clock clock, int deadlineMs) {
        this.clock = clock;
        this.deadlineMs = deadlineMs;
        this.lotSince = clock.instant();
        java.util.TreeSet<Double> b = new java.util.TreeSet<>(java.util.List.of(1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0, 200.0, 500.0, 1000.0, 2000.0, 5000.0));
        b.add((double) deadlineMs);
        bucketMs = b.stream().mapToDouble(Double::doubleValue).toArray();
        bucketCount = new long[bucketMs.length + 1]; // the last: above every bound
    }

    /**
     * Everything people read on the dashboard.
     *
     * @param lot        the lot the figures are for
     * @param lotTally   the lot since it started (or since reset-counters)
     * @param yieldLowPct  Wilson 95 % interval of the lot's yield, low end
     * @param yieldHighPct high end
     * @param uphMinute  parts finished in the last minute × 60
     * @param uphHour    parts finished in the last hour (not extrapolated: after a start it counts the rows read back)
     * @param window10Min parts finished and passed in the last 10 minutes (rolling, whatever the lot)
     * @param windowHour  the same for the last hour
     */
    record Snapshot(String lot, Instant lotSince, BinTally.Snapshot lotTally, BinTally.Snapshot total, double yieldLowPct,
                    double yieldHighPct, double uphMinute, double uphHour, double p50Ms, double p99Ms, double maxMs,
                    long decisions, long late, long repeats, long rejected, long reusedSeqs, long busy, Window window10Min, Window windowHour,
                    Latency latency) {}

    /**
     * The trigger→decision latencies in buckets, for a metrics histogram.
     *
     * @param upperMs upper bound of each bucket but the last, ascending (ms)
     * @param counts  decisions per bucket (not cumulative); one more than {@code upperMs}: the last is above every bound
     * @param sumMs   sum of all latencies (ms)
     */
    record Latency(java.util.List<Double> upperMs, java.util.List<Long> counts, double sumMs) {
        Latency {
            upperMs = java.util.List.copyOf(upperMs);
            counts = java.util.List.copyOf(counts);
            if (counts.size() != upperMs.size() + 1) throw new IllegalArgumentException("counts: one more than upperMs");
        }
    }

    /** Parts finished and passed in a rolling time window. */
    record Window(long parts, long passed) {}

    @Override
    public synchronized void decided(net.zbin.core.DecisionEvent e) {
        var d = e.decision();
        var g = d.grading();
        decisions++;
        tally.add(g, d.kind() == Trigger.Kind.PART);
        if (Double.isFinite(d.latencyMs())) {
            latencyUs.recordValue(Math.max(0, Math.min(60_000_000L, Math.round(d.latencyMs() * 1000))));
            int b = java.util.Arrays.binarySearch(bucketMs, d.latencyMs());
            bucketCount[b >= 0 ? b : -b - 1]++; // a value on a bound counts in that bound's bucket (le)
            latencySumMs += d.latencyMs();
            if (d.latencyMs() > deadlineMs) late++;
        }
        if (d.kind() == Trigger.Kind.PART && g.verdict() != Verdict.RETEST) finished.add(e.time().getEpochSecond(), g.verdict() == Verdict.PASS);
    }

    /**
     * What the decisions built up, to carry it across a restart of the daemon: the running tally and the lot's base,
     * the latency (HdrHistogram's compressed form, Base64) and its buckets, the finished parts per second and minute,
     * the lot and its start, the last reset-counters. Not in it: the counters of answers that write no row (the line's
     * state file keeps those).
     */
    record State(BinTally.Snapshot tally, BinTally.Snapshot base, String latencyUs, java.util.List<Long> bucketCounts, double latencySumMs,
                 FinishedRing.State finished, String lot, String lotSince, String resetAt, long decisions, long late) {
        State {
            bucketCounts = java.util.List.copyOf(bucketCounts);
        }
    }

    State state() { return capture().get(); }

    /**
     * The {@link State} as it is now: copies taken under the lock (the measuring thread pays for those only), the
     * histogram compressed when the supplier is called (by the thread that writes the checkpoint).
     */
    synchronized java.util.function.Supplier<State> capture() {
        Histogram lat = latencyUs.copy();
        BinTally.Snapshot all = tally.snapshot(), b = base;
        java.util.List<Long> buckets = java.util.Arrays.stream(bucketCount).boxed().toList();
        double sum = latencySumMs;
        FinishedRing.State ring = finished.state();
        String l = lot, since = lotSince == null ? null : lotSince.toString(), reset = resetAt == null ? null : resetAt.toString();
        long dec = decisions, lt = late;
        return () -> {
            java.nio.ByteBuffer buf = java.nio.ByteBuffer.allocate(lat.getNeededByteBufferCapacity());
            int n = lat.encodeIntoCompressedByteBuffer(buf);
            return new State(all, b, java.util.Base64.getEncoder().encodeToString(java.util.Arrays.copyOf(buf.array(), n)), buckets, sum, ring,
                    l, since, reset, dec, lt);
        };
    }

    /**
     * Takes up {@code s} in place of what the decisions built up here.
     *
     * @throws IllegalArgumentException the latency buckets are not this line's (another deadline), the histogram or a time is unreadable
     */
    synchronized void restore(State s) {
        if (s.bucketCounts().size() != bucketCount.length)
            throw new IllegalArgumentException("bucketCounts: " + s.bucketCounts().size() + " buckets, this line has " + bucketCount.length);
        Histogram h;
        Instant since, reset;
        try {
            since = s.lotSince() == null ? null : Instant.parse(s.lotSince());
            reset = s.resetAt() == null ? null : Instant.parse(s.resetAt());
        } catch (java.time.format.DateTimeParseException e) {
            throw new IllegalArgumentException("lotSince/resetAt: not an instant (" + e.getMessage() + ")", e);
        }
        try {
            h = Histogram.decodeFromCompressedByteBuffer(java.nio.ByteBuffer.wrap(java.util.Base64.getDecoder().decode(s.latencyUs())), 0);
        } catch (java.util.zip.DataFormatException | RuntimeException e) {
            throw new IllegalArgumentException("latencyUs: not a histogram (" + e.getMessage() + ")", e);
        }
        tally.restore(s.tally());
        base = s.base();
        latencyUs.reset();
        latencyUs.add(h);
        for (int i = 0; i < bucketCount.length; i++) bucketCount[i] = s.bucketCounts().get(i);
        latencySumMs = s.latencySumMs();
        finished.restore(s.finished());
        lot = s.lot();
        lotSince = since;
        resetAt = reset;
        decisions = s.decisions();
        late = s.late();
    }

    synchronized void repeated() { repeats++; }

    synchronized void rejected() { rejected++; }

    synchronized void seqReused() { reusedSeqs++; }

    synchronized void busy() { busy++; }

    /** A new lot: its figures start from here. */
    synchronized Ended startLot(String l, Instant when) {
        BinTally.Snapshot now = tally.snapshot();
        Ended e = new Ended(lot, lotSince, base, now, decisions, late, repeats, rejected, reusedSeqs, busy);
        lot = l;
        lotSince = when;
        resetAt = null;
        base = now;
        return e;
    }

    /**
     * The figures a lot ended with, taken as it ended — a few references and counts, so the measuring thread pays next
     * to nothing at a lot change; its dashboard is built from them later ({@link #snapshot(Ended)}).
     *
     * @param from the running tally when the lot's figures started (the lot's start or its last reset-counters)
     * @param to   the running tally when it ended
     */
    record Ended(String lot, Instant lotSince, BinTally.Snapshot from, BinTally.Snapshot to, long decisions, long late, long repeats,
                 long rejected, long reusedSeqs, long busy) {}

    /** reset-counters: the lot's figures start again from here (totals keep counting). */
    synchronized void reset() { resetAt(clock.instant()); }

    /** reset-counters as of {@code when} (also when the record log is read back after a restart). */
    synchronized void resetAt(Instant when) {
        base = tally.snapshot();
        lotSince = when;
        resetAt = when; // the latency histogram keeps counting: counts only grow (a reset is a new "since", not lost data)
    }

    /** When reset-counters last ran in this lot, or null. */
    synchronized Instant resetAt() { return resetAt; }

    /** Counters of answers that write no row, as they were before a restart. */
    synchronized void restore(long repeats, long rejected, long reusedSeqs, long busy) {
        this.repeats += repeats;
        this.rejected += rejected;
        this.reusedSeqs += reusedSeqs;
        this.busy += busy;
    }

    synchronized String lot() { return lot; }

    /**
     * The figures now. Only copies are taken under the lock (the tally, the ring's sums, the latency histogram);
     * the percentiles are read from the copy after it, so the measuring thread never waits on the dashboard.
     */
    Snapshot snapshot() { return snapshot(null); }

    /**
     * The figures of a lot that ended ({@code ended}; null: the line now): its lot, tally, yield and counts as it ended,
     * the rolling windows and the latency as they are now.
     */
    Snapshot snapshot(Ended ended) {
        BinTally.Snapshot all, l;
        double minute;
        Window h, m10;
        Histogram lat;
        String lotNow;
        Instant since;
        long dec, lt, rep, rej, reused, bz;
        long[] buckets;
        double sumMs;
        synchronized (this) {
            buckets = bucketCount.clone();
            sumMs = latencySumMs;
            all = tally.snapshot();
            l = all.minus(base);
            long now = clock.instant().getEpochSecond();
            minute = finished.window(now, 60).parts() * 60.0;
            h = finished.window(now, 3600);
            m10 = finished.window(now, 600);
            lat = latencyUs.copy();
            lotNow = lot;
            since = lotSince;
            dec = decisions;
            lt = late;
            rep = repeats;
            rej = rejected;
            reused = reusedSeqs;
            bz = busy;
        }
        if (ended != null) {
            all = ended.to();
            l = all.minus(ended.from());
            lotNow = ended.lot();
            since = ended.lotSince();
            dec = ended.decisions();
            lt = ended.late();
            rep = ended.repeats();
            rej = ended.rejected();
            reused = ended.reusedSeqs();
            bz = ended.busy();
        }
        double[] ci = Wilson.interval(l.passed(), l.parts(), Wilson.Z95);
        boolean any = lat.getTotalCount() > 0;
        return new Snapshot(lotNow, since, l, all, ci[0] * 100, ci[1] * 100, minute, h.parts(),
                any ? lat.getValueAtPercentile(50) / 1000.0 : Double.NaN,
                any ? lat.getValueAtPercentile(99) / 1000.0 : Double.NaN,
                any ? lat.getMaxValue() / 1000.0 : Double.NaN, dec, lt, rep, rej, reused, bz, m10, h,
                new Latency(java.util.Arrays.stream(bucketMs).boxed().toList(), java.util.Arrays.stream(buckets).boxed().toList(), sumMs));
    }
}
