package net.zbin.app.daemon;

import java.time.Instant;
import java.util.ArrayDeque;
import net.zbin.core.BinTally;
import net.zbin.core.Decision;
import net.zbin.core.Wilson;
import org.HdrHistogram.Histogram;

/**
 * Running figures of one line since the last reset: bins, reasons, yield, throughput, latency.
 * Fed by the measuring thread, read by the dashboard thread; {@link #snapshot} is the only view out.
 */
final class LineStats {
    private static final long UPH_WINDOW_MS = 60_000;

    private final BinTally tally = new BinTally();
    private final Histogram latencyUs = new Histogram(60_000_000L, 3);
    private final ArrayDeque<Long> recentMs = new ArrayDeque<>();
    private long late, repeats, rejected;
    private Instant since;
    private long sinceMs;

    LineStats(Instant now) { reset(now); }

    /** Immutable figures for the dashboard. Yield counts parts only (checks and repeats excluded). */
    record Snapshot(BinTally.Snapshot tally, double yieldLowPct, double yieldHighPct, double uph,
                    double p50Ms, double p99Ms, double maxMs, long late, long repeats, long rejected, Instant since) {}

    synchronized void decided(Decision d, boolean isLate, long nowMs) {
        if ("part".equals(d.kind())) tally.add(d.grading());
        latencyUs.recordValue(Math.max(0, Math.min(60_000_000L, Math.round(d.latencyMs() * 1000))));
        if (isLate) late++;
        recentMs.addLast(nowMs);
        trim(nowMs);
    }

    synchronized void repeated() { repeats++; }

    synchronized void rejected() { rejected++; }

    synchronized void reset(Instant now) {
        tally.reset();
        latencyUs.reset();
        recentMs.clear();
        late = repeats = rejected = 0;
        since = now;
        sinceMs = now.toEpochMilli();
    }

    private void trim(long nowMs) {
        while (!recentMs.isEmpty() && recentMs.peekFirst() < nowMs - UPH_WINDOW_MS) recentMs.pollFirst();
    }

    synchronized Snapshot snapshot(long nowMs) {
        trim(nowMs);
        BinTally.Snapshot s = tally.snapshot();
        double[] ci = Wilson.interval(s.passed(), s.total(), Wilson.Z95);
        long window = Math.min(UPH_WINDOW_MS, Math.max(1, nowMs - sinceMs));
        double uph = recentMs.size() * 3_600_000.0 / window;
        boolean any = latencyUs.getTotalCount() > 0;
        return new Snapshot(s, ci[0] * 100, ci[1] * 100, uph,
                any ? latencyUs.getValueAtPercentile(50) / 1000.0 : Double.NaN,
                any ? latencyUs.getValueAtPercentile(99) / 1000.0 : Double.NaN,
                any ? latencyUs.getMaxValue() / 1000.0 : Double.NaN, late, repeats, rejected, since);
    }
}
