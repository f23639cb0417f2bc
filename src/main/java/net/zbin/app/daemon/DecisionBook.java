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

    /**
     * @param answeredNanos when its answer went out (System.nanoTime), meaningful only when {@code answerTimed}: a
     *                      decision read back from the record log was answered by an earlier process
     */
    private record Entry(Decision decision, long atMs, long answeredNanos, boolean answerTimed) {}

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

    /** @param arrivedNanos when the trigger came (System.nanoTime, as the line stamps it) */
    Lookup find(Trigger t, String lotId, long nowMs, long arrivedNanos) {
        Entry e = bySeq.get(t.seq());
        if (e == null) return new Fresh(false);
        Decision d = e.decision();
        boolean same = d.part().equals(t.part()) && d.lot().equals(lotId) && d.kind() == t.kind() && nowMs - e.atMs() <= windowMs;
        // A part that was not measured (line paused, faulted, busy, a stale trigger) is measured when its trigger comes
        // again — unless this trigger came before that answer went out: the handler sent it again without having heard
        // the answer (its patience ran out while the line was late), acts on that answer, and gets it again. Measured, it
        // would give the presentation a second, contradicting answer and a graded row the handler never acted on.
        if (same && d.grading().reason().kind() == net.zbin.core.Reason.Kind.NOT_MEASURED)
            return e.answerTimed() && arrivedNanos - e.answeredNanos() < 0 ? new Repeat(d) : new Fresh(false);
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

    /** A decision whose answer went out at an unknown time (read back from the record log). */
    void put(Decision d, long atMs) { put(d, atMs, 0, false); }

    /** @param answeredNanos when its answer went out (System.nanoTime) */
    void put(Decision d, long atMs, long answeredNanos) { put(d, atMs, answeredNanos, true); }

    private void put(Decision d, long atMs, long answeredNanos, boolean answerTimed) {
        bySeq.remove(d.seq());
        bySeq.put(d.seq(), new Entry(d, atMs, answeredNanos, answerTimed));
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
