package net.zbin.app.daemon;

import java.util.LinkedHashMap;
import java.util.Map;
import net.zbin.core.Decision;
import net.zbin.core.Trigger;

/**
 * The presentations decided in the current lot, so that a trigger that is provably the same
 * presentation — same seq, part and lot, within the repeat window — gets the same answer again and is
 * never measured twice, and a retest finds its attempt count. A seq that comes back with another part
 * or lot, or after the window, is a new presentation (handlers restart their counters): it is measured
 * and counted as a reused seq. A new lot starts a fresh book. Bounded by count. Measuring thread only.
 */
final class DecisionBook {
    /** What the book says about a trigger. */
    sealed interface Lookup permits Repeat, Fresh {}

    /** The same presentation, decided already: answer this again. */
    record Repeat(Decision decision) implements Lookup {}

    /** A presentation to measure; {@code reusedSeq} when its seq was decided before for another presentation. */
    record Fresh(boolean reusedSeq) implements Lookup {}

    private record Entry(Decision decision, long atMs) {}

    private final long windowMs;
    private final Map<Long, Entry> bySeq;
    private volatile String lot = "";
    private long reused;

    /**
     * @param windowMs a trigger later than this after its decision is a new presentation
     * @param capacity presentations kept for repeats and retest counts; the oldest go first
     */
    DecisionBook(long windowMs, int capacity) {
        this.windowMs = windowMs;
        this.bySeq = new LinkedHashMap<>(1024, 0.75f, false) {
            @Override
            protected boolean removeEldestEntry(Map.Entry<Long, Entry> e) { return size() > capacity; }
        };
    }

    /** The lot the book is for. */
    String lot() { return lot; }

    /** Starts a fresh book when the lot changes; true when it did. */
    boolean enterLot(String l) {
        if (l.equals(lot)) return false;
        lot = l;
        bySeq.clear();
        return true;
    }

    Lookup find(Trigger t, String lotId, long nowMs) {
        Entry e = bySeq.get(t.seq());
        if (e == null) return new Fresh(false);
        Decision d = e.decision();
        boolean same = d.part().equals(t.part()) && d.lot().equals(lotId) && d.kind() == t.kind() && nowMs - e.atMs() <= windowMs;
        // A part that was not measured (line paused, faulted, busy) is measured when its trigger comes again.
        if (same && d.grading().reason().kind() == net.zbin.core.Reason.Kind.NOT_MEASURED) return new Fresh(false);
        if (same) return new Repeat(d);
        reused++;
        return new Fresh(true);
    }

    /** The attempt of a presentation that retests {@code retestOf}: one more than that one's, if it is the same part. */
    int attemptFor(Trigger t, String lotId) {
        if (t.retestOf() < 0) return 0;
        Entry e = bySeq.get(t.retestOf());
        if (e == null || !e.decision().part().equals(t.part()) || !e.decision().lot().equals(lotId)) return 1;
        boolean measured = e.decision().grading().reason().kind() != net.zbin.core.Reason.Kind.NOT_MEASURED;
        return e.decision().attempt() + (measured ? 1 : 0); // a presentation not measured does not count against the limit
    }

    void put(Decision d, long atMs) {
        bySeq.remove(d.seq());
        bySeq.put(d.seq(), new Entry(d, atMs));
        // Presentations older than the repeat window and a minute for retests are of no further use: memory stays flat.
        var it = bySeq.values().iterator();
        while (it.hasNext()) {
            Entry oldest = it.next();
            if (atMs - oldest.atMs() <= Math.max(windowMs, 60_000)) break;
            it.remove();
        }
    }

    /** Seqs that came back as another presentation, since start. */
    long reusedSeqs() { return reused; }

    int size() { return bySeq.size(); }
}
