package net.zbin.app.daemon;

import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ConcurrentLinkedQueue;
import net.zbin.core.Trigger;

/**
 * The presentations the overflow thread answers {@code line-busy}, so that a handler's copy of such a trigger is not
 * measured behind that answer's back. A trigger beyond the full queue is claimed here on Paho's thread, before Paho
 * hands on the next message, so its copy always finds the claim; the overflow thread stamps when the answer went out.
 * A copy that reached the line before then (the handler had not heard the answer it then acts on), or was taken up
 * within {@link DecisionBook#LATE_COPY_NANOS} after it (the line is late, Paho's thread behind), gets {@code line-busy}
 * again, not a reading; one sent later is a deliberate new presentation and is measured.
 * Kept for the repeat window after the answer (a copy may wait in the queue), bounded by count: each holds the decoded
 * trigger (its part and lot at most 128 characters each) and two stamps, not the answer, which is built again.
 */
final class BusyClaims {
    /** One presentation answered, or about to be answered, {@code line-busy}. */
    static final class Claim {
        final Trigger trigger;
        final String lot;
        /** When the answer went out (System.nanoTime, and ms of the repeat window's clock); {@link #answered} is set last. */
        private volatile long answeredNanos, answeredMs;
        private volatile boolean answered;

        Claim(Trigger trigger, String lot) {
            this.trigger = trigger;
            this.lot = lot;
        }

    }

    private final long windowMs;
    private final int capacity;
    private final ConcurrentHashMap<Long, Claim> bySeq = new ConcurrentHashMap<>();
    /** The claims in the order they were made (each answered in that order: the overflow thread is one thread). */
    private final ConcurrentLinkedQueue<Claim> order = new ConcurrentLinkedQueue<>();
    /** Claims in {@link #order} (its own size() walks it); guarded by this. */
    private int kept;

    /**
     * @param windowMs how long after its answer a claim is kept
     * @param capacity claims kept at most (the oldest answered go first)
     */
    BusyClaims(long windowMs, int capacity) {
        this.windowMs = windowMs;
        this.capacity = capacity;
    }

    /** Paho's thread (one at a time): {@code t} (of {@code lot}) will be answered {@code line-busy}. */
    synchronized Claim claim(Trigger t, String lot, long nowMs) {
        Claim c = new Claim(t, lot);
        bySeq.put(t.seq(), c);
        order.add(c);
        kept++;
        for (Claim head; (head = order.peek()) != null; ) {
            boolean aged = head.answered && nowMs - head.answeredMs > windowMs;
            if (!aged && kept <= capacity) break;
            order.poll();
            kept--;
            bySeq.remove(head.trigger.seq(), head); // unless a later claim of the same seq took its place
        }
        return c;
    }

    /** The overflow thread, right after the publish: {@code c}'s answer went out. */
    void answered(Claim c, long nanos, long ms) {
        c.answeredNanos = nanos;
        c.answeredMs = ms;
        c.answered = true;
    }

    /**
     * The measuring thread, or Paho's for a copy that is itself beyond the full queue: the claim {@code t} is a copy of
     * — the same seq, part, lot and kind, arrived ({@code arrivedNanos}) before that claim's answer went out or within
     * {@link DecisionBook#LATE_COPY_NANOS} after — or null.
     */
    Claim copyOf(Trigger t, String lot, long arrivedNanos) {
        if (bySeq.isEmpty()) return null; // the usual case: no seq boxed on the trigger path
        Claim c = bySeq.get(t.seq());
        if (c == null) return null;
        Trigger o = c.trigger;
        if (!o.part().equals(t.part()) || !c.lot.equals(lot) || o.kind() != t.kind()) return null;
        return !c.answered || arrivedNanos - c.answeredNanos < DecisionBook.LATE_COPY_NANOS ? c : null;
    }

    /** Claims kept (for tests). */
    int size() { return bySeq.size(); }
}
