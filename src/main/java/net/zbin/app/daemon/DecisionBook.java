package net.zbin.app.daemon;

import java.util.ArrayDeque;
import java.util.LinkedHashMap;
import java.util.Map;
import net.zbin.core.Decision;
import net.zbin.core.Reason;
import net.zbin.core.Trigger;

/**
 * The presentations decided in the current lot, so that a trigger that is provably the same
 * presentation — same seq, part and lot, within the repeat window — gets the same answer again and is
 * never measured twice, and a retest finds its attempt count. A seq that comes back with another part
 * or lot, or after the window, is a new presentation (handlers restart their counters): it is measured
 * and counted as a reused seq. A new lot starts a fresh book. Bounded by count and by age: a presentation is kept a
 * minute (or the repeat window, when longer) for its retests, but its whole decision only for the repeat window — after
 * that, only what a retest and a reused seq ask of it ({@link Past}). At a handler's pace a minute is thousands of
 * decisions, and every young collection of the JVM copies what is still alive: with whole decisions kept the minute, the
 * young collections of a line deciding 1 000 parts a second paused about a third longer. Written by the measuring thread only;
 * read by Paho's thread too, for a copy that arrives while the queue is full ({@link #repeatOf}), so access is locked
 * (uncontended on the trigger path: a lock costs nanoseconds against a decision's tens of microseconds).
 */
final class DecisionBook {
    /** What the book says about a trigger. */
    sealed interface Lookup permits Repeat, Fresh {}

    /** The same presentation, decided already: answer this again. */
    record Repeat(Decision decision) implements Lookup {}

    /** A presentation to measure; {@code reusedSeq} when its seq was decided before for another presentation. */
    record Fresh(boolean reusedSeq) implements Lookup {}

    /** A presentation in the book, taken up at {@code atMs} (the line's monotonic time, ms). */
    private sealed interface Kept permits Entry, Past {
        long atMs();
    }

    /**
     * A presentation within its repeat window, with the whole decision to answer again.
     *
     * @param answeredNanos when its answer went out (System.nanoTime), meaningful only when {@code answerTimed}: a
     *                      decision read back from the record log was answered by an earlier process
     */
    private record Entry(Decision decision, long atMs, long answeredNanos, boolean answerTimed) implements Kept {}

    /**
     * A presentation past its repeat window: no copy of it is answered again (a trigger with its seq is a new
     * presentation, counted as a reused seq), so only what a retest of it asks is kept.
     *
     * @param measured whether it was measured (a presentation not measured does not count against the retest limit)
     */
    private record Past(String part, String lot, int attempt, boolean measured, long atMs) implements Kept {
        static Past of(Entry e) {
            Decision d = e.decision();
            return new Past(d.part(), d.lot(), d.attempt(), d.grading().reason().kind() != Reason.Kind.NOT_MEASURED, e.atMs());
        }
    }

    /**
     * How long after an answer the line gave because it was late ({@code stale-trigger}, or {@code line-busy} from the
     * overflow queue, {@link BusyClaims}) a copy of its trigger still counts as sent before it (ns). The line is late
     * when a handler's copies are on their way and the MQTT thread takes them up late: in a loaded suite run a copy
     * likely sent before a {@code stale-trigger} answer was taken up 1.7 ms after it. A handler presenting the part again
     * with the same seq this soon after hearing the answer gets it once more and presents again.
     */
    static final long LATE_COPY_NANOS = 50_000_000L;

    private final long windowMs;
    private final Map<Long, Kept> bySeq;
    /**
     * The entries put with their whole decision, oldest first, some since replaced (their seq put again) or gone: where
     * {@link #put} looks for decisions past their window. By entry, not by seq: a seq put again must not hold the
     * entries behind its first place whole.
     */
    private final ArrayDeque<Entry> whole = new ArrayDeque<>();
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
            protected boolean removeEldestEntry(Map.Entry<Long, Kept> e) { return size() > capacity; }
        };
    }

    /** The lot the book is for. */
    String lot() { return lot; }

    /** Starts a fresh book when the lot changes; true when it did. */
    synchronized boolean enterLot(String l) {
        if (l.equals(lot)) return false;
        lot = l;
        bySeq.clear();
        whole.clear();
        return true;
    }

    /** @param arrivedNanos when the trigger came (System.nanoTime, as the line stamps it) */
    synchronized Lookup find(Trigger t, String lotId, long nowMs, long arrivedNanos) {
        Kept k = bySeq.get(t.seq());
        if (k == null) return new Fresh(false);
        // A Past went past its window against a later put's time. The line's times are monotonic and a lookup on the
        // measuring thread comes after every put before it, so it is past it now too; a copy that Paho's thread stamped a
        // few ms before a concurrent put (repeatOf, at the window's very edge) is not answered again, as a new one.
        if (k instanceof Entry e && same(e, t, lotId, nowMs)) return repeats(e, arrivedNanos) ? new Repeat(e.decision()) : new Fresh(false);
        reused++;
        return new Fresh(true);
    }

    /**
     * Any thread: the answer to give again if {@code t} is a copy of a presentation in the book, or null (a new
     * presentation, or one to measure again). Counts nothing.
     */
    synchronized Repeat repeatOf(Trigger t, String lotId, long nowMs, long arrivedNanos) {
        return bySeq.get(t.seq()) instanceof Entry e && same(e, t, lotId, nowMs) && repeats(e, arrivedNanos) ? new Repeat(e.decision()) : null;
    }

    private boolean same(Entry e, Trigger t, String lotId, long nowMs) {
        Decision d = e.decision();
        return d.part().equals(t.part()) && d.lot().equals(lotId) && d.kind() == t.kind() && nowMs - e.atMs() <= windowMs;
    }

    /**
     * Whether the same presentation gets its answer again. A part that was not measured (line paused, faulted, busy, a
     * stale trigger) is measured when its trigger comes again — unless this trigger came before that answer went out:
     * the handler sent it again without having heard the answer (its patience ran out while the line was late), acts on
     * that answer, and gets it again. Measured, it would give the presentation a second, contradicting answer and a
     * graded row the handler never acted on. A copy taken up within {@link #LATE_COPY_NANOS} after a
     * {@code stale-trigger} answer counts as sent before it.
     */
    private static boolean repeats(Entry e, long arrivedNanos) {
        Reason reason = e.decision().grading().reason();
        if (reason.kind() != Reason.Kind.NOT_MEASURED) return true;
        if (!e.answerTimed()) return false;
        long afterAnswer = arrivedNanos - e.answeredNanos();
        return afterAnswer < (reason == Reason.STALE_TRIGGER ? LATE_COPY_NANOS : 0);
    }

    /** The attempt of a presentation that retests {@code retestOf}: one more than that one's, if it is the same part. */
    synchronized int attemptFor(Trigger t, String lotId) {
        if (t.retestOf() < 0) return 0;
        Kept k = bySeq.get(t.retestOf());
        if (k == null) return 1;
        Past p = k instanceof Entry e ? Past.of(e) : (Past) k;
        if (!p.part().equals(t.part()) || !p.lot().equals(lotId)) return 1;
        return p.attempt() + (p.measured() ? 1 : 0); // a presentation not measured does not count against the limit
    }

    /** A decision whose answer went out at an unknown time (read back from the record log). */
    void put(Decision d, long atMs) { put(d, atMs, 0, false); }

    /** @param answeredNanos when its answer went out (System.nanoTime) */
    void put(Decision d, long atMs, long answeredNanos) { put(d, atMs, answeredNanos, true); }

    private synchronized void put(Decision d, long atMs, long answeredNanos, boolean answerTimed) {
        Entry entry = new Entry(d, atMs, answeredNanos, answerTimed);
        bySeq.remove(d.seq());
        bySeq.put(d.seq(), entry);
        whole.addLast(entry);
        // Decisions past the repeat window are answered no more: kept only for their retests.
        while (!whole.isEmpty()) {
            Entry e = whole.peekFirst();
            Long seq = e.decision().seq();
            if (bySeq.get(seq) == e) {
                if (atMs - e.atMs() <= windowMs) break;
                bySeq.replace(seq, Past.of(e)); // keeps its place in the book's order
            }
            whole.pollFirst();
        }
        // Presentations older than the repeat window and a minute for retests are of no further use: memory stays flat.
        var it = bySeq.values().iterator();
        while (it.hasNext()) {
            Kept oldest = it.next();
            if (atMs - oldest.atMs() <= Math.max(windowMs, 60_000)) break;
            it.remove();
        }
    }

    /** Seqs that came back as another presentation, since start. */
    synchronized long reusedSeqs() { return reused; }

    synchronized int size() { return bySeq.size(); }

    /** Presentations kept with their whole decision (the others are past their repeat window). */
    synchronized int withWholeDecision() { return (int) bySeq.values().stream().filter(k -> k instanceof Entry).count(); }
}
