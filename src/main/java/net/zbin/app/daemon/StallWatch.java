package net.zbin.app.daemon;

import java.util.concurrent.locks.LockSupport;
import java.util.function.LongSupplier;

/**
 * Notices when this process stood still — stopped by a signal, its virtual CPU taken away by the host, a collection that
 * stops every thread — so that a message taken up right after it counts as come when it began.
 *
 * <p>Why: a message is stamped when the MQTT client's thread takes it up. While the process stands still, a trigger (and
 * the handler's copy of it, sent when its patience ran out) waits on the connection unseen; stamped afterwards, it would
 * look fresh: measured although its deadline passed long ago and another part may be on the contacts, and a copy sent
 * before the first one's answer would look sent after it. A thread of its own beats every {@link #BEAT_NANOS}; a beat later
 * than {@link #STALL_NANOS} after the one before marks a stand-still from the earlier beat to the later one, and a beat
 * that is overdue when a message comes means one may be going on, seen from a thread that moves again first.
 *
 * <p>What it cannot see: one thread held off the CPU while the others run (the MQTT client's reader on a loaded machine);
 * and stand-stills shorter than {@link #STALL_NANOS}, which a deadline of tens of milliseconds or more can afford.
 */
final class StallWatch {
    /**
     * How often the watch's thread beats, ns: 500 wake-ups a second, about 1 % of a CPU (10 µs per decision of a line
     * at 1 000 parts/s in {@code FreshStartBench}).
     */
    static final long BEAT_NANOS = 2_000_000;
    /** A gap between beats longer than this is a stand-still, ns (five beats: a late wake-up is not one). */
    static final long STALL_NANOS = 10_000_000;
    /**
     * How long after the watch saw a stand-still end a message still counts as come when it began, ns: one beat. The
     * messages that waited on the connection are taken up as the process moves again, before or just after the watch;
     * the ones behind them follow back to back ({@link Dispatch} carries the date along). A longer window would date
     * a handler's answer to the first of them — a part presented again at once — to the stand-still too, and again,
     * until its retests ran out.
     */
    static final long AFTER_NANOS = BEAT_NANOS;
    /**
     * How long after the watch saw a stand-still end the first message taken up since still counts as come when it
     * began, at most, ns (and no longer than the stand-still lasted): on a loaded machine the thread that takes messages
     * up may move again milliseconds after the watch's. At most one message, and its wait grows by no more than twice
     * the stand-still, so a part presented after one costs one retest at worst.
     */
    static final long FIRST_NANOS = 50_000_000;
    /** A stand-still this long or longer is logged, ns. */
    static final long LOGGED_NANOS = 50_000_000;
    /**
     * At most {@link #LOGGED_PER_MINUTE} warnings a minute: an overloaded machine can stop the process many times a
     * minute, and a line per stand-still would bury the log; the ones held back are counted in one line once the minute is
     * over.
     */
    static final int LOGGED_PER_MINUTE = 10;
    private static final long MINUTE_NANOS = 60_000_000_000L;
    private static final org.slf4j.Logger LOG = org.slf4j.LoggerFactory.getLogger(StallWatch.class);

    /** One stand-still: from the last beat before it to the first after it (System.nanoTime). */
    private record Stall(long startNanos, long endNanos) {}

    private final LongSupplier nanos;
    private volatile long beatNanos;
    private volatile Stall last = new Stall(Long.MIN_VALUE / 4, Long.MIN_VALUE / 4);
    private volatile boolean stopped;
    /** Whether anything beats: a watch that never beat (a line not started, a test's own clock) sees no stand-still. */
    private volatile boolean watching;
    /** The beating thread's own: when the minute of warnings began, the warnings in it, and the stand-stills held back. */
    private long minuteNanos = Long.MIN_VALUE / 4;
    private int loggedInMinute;
    private int heldBack;
    private long heldBackLongestNanos;

    /** @param nanos the monotonic clock, ns (System.nanoTime: the line stamps messages with it) */
    StallWatch(LongSupplier nanos) {
        this.nanos = nanos;
        this.beatNanos = nanos.getAsLong();
    }

    /** Starts the watch's thread (a daemon thread, beating until {@link #stop}). */
    void start(String line) {
        beatNanos = nanos.getAsLong(); // from now: the time since the line was built is no stand-still
        watching = true;
        Daemon.named(() -> {
            while (!stopped) {
                LockSupport.parkNanos(BEAT_NANOS);
                beat();
            }
        }, "stall-watch-" + line).start();
    }

    void stop() { stopped = true; }

    /** One beat, now: called by the watch's thread, and by tests with their own clock. */
    void beat() {
        long now = nanos.getAsLong(), before = beatNanos;
        if (now - before > STALL_NANOS) {
            last = new Stall(before, now);
            if (now - before >= LOGGED_NANOS) logged(now, now - before);
        } else if (heldBack > 0 && now - minuteNanos >= MINUTE_NANOS) {
            sumUp(now);
        }
        beatNanos = now;
        watching = true;
    }

    /** A stand-still of {@code lengthNanos} long enough to tell the operator of: now, or counted into a later warning. */
    private void logged(long now, long lengthNanos) {
        if (now - minuteNanos >= MINUTE_NANOS) {
            if (heldBack > 0) sumUp(now);
            else {
                minuteNanos = now;
                loggedInMinute = 0;
            }
        }
        if (loggedInMinute < LOGGED_PER_MINUTE) {
            LOG.warn("the process stood still for {} ms", lengthNanos / 1_000_000);
            loggedInMinute++;
            return;
        }
        heldBack++;
        heldBackLongestNanos = Math.max(heldBackLongestNanos, lengthNanos);
    }

    /** The stand-stills held back in the minute that is over, in one warning that begins the next minute. */
    private void sumUp(long now) {
        LOG.warn("stand-stills not logged in the last {} s: {}, the longest {} ms", (now - minuteNanos) / 1_000_000_000,
                heldBack, heldBackLongestNanos / 1_000_000);
        minuteNanos = now;
        loggedInMinute = 1;
        heldBack = 0;
        heldBackLongestNanos = 0;
    }

    /**
     * When a message taken up at {@code nowNanos} may have come: the last beat, when the watch is overdue (the process may
     * be coming out of a stand-still the watch has not yet seen end); the start of the last stand-still, when the watch
     * saw it end less than {@link #AFTER_NANOS} before, or after, or — nothing taken up since — less than its own length
     * (at most {@link #FIRST_NANOS}) before; else {@code nowNanos} (also while nothing beats).
     *
     * @param lastTakenNanos when the message before this one was taken up
     */
    long mayHaveComeAt(long nowNanos, long lastTakenNanos) {
        if (!watching) return nowNanos;
        long beat = beatNanos;
        if (nowNanos - beat > STALL_NANOS) return beat;
        Stall s = last;
        // (a stand-still that the watch saw end after this message was taken up covers it: "after" is negative then)
        long after = nowNanos - s.endNanos();
        boolean first = lastTakenNanos - s.endNanos() < 0 && after < Math.min(FIRST_NANOS, s.endNanos() - s.startNanos());
        return nowNanos > s.startNanos() && (after < AFTER_NANOS || first) ? s.startNanos() : nowNanos;
    }
}
