package net.zbin.app.daemon;

import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.RejectedExecutionException;
import java.util.concurrent.ThreadPoolExecutor;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.locks.ReentrantLock;
import java.util.function.BooleanSupplier;
import java.util.function.LongSupplier;
import net.zbin.io.mqtt.Ack;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The hand-over from Paho's thread to the measuring thread, through a bounded queue. A trigger beyond the queue is
 * answered at once ({@code line-busy}, not measured) by the overflow thread, so the handler always gets an answer and
 * memory stays bounded whatever a client sends.
 *
 * <p>The line's work runs one piece at a time, in the order it came, under one lock ({@link #turn}): "the measuring
 * thread" is whichever thread holds it. A trigger that finds the line idle — nothing handed over and unfinished, the
 * last piece ended at least {@link #QUIET_NANOS} ago, the last message took at most {@link #SHORT_NANOS}, the MQTT link
 * has room in its window — runs on Paho's callback thread itself: its answer then costs no wake-up of another thread.
 * Messages that come while work waits, or straight after it (a flood, read from the socket back to back), go through
 * the queue, so a flood is taken off the broker and answered from zbin's queue.
 *
 * <p>A message is stamped when Paho's thread hands it here; while that thread ran a part, messages behind it waited
 * unstamped. So after a run in place longer than {@link #SHORT_NANOS}, the messages that follow it closely are taken to
 * have come when that run began. So are the messages taken up as the whole process moves again after standing still
 * ({@link StallWatch}), and those back to back behind them: to have come when the stand-still began. A trigger's wait
 * (its deadline check, {@code stale-trigger}) is never undercounted by more than a short run or a stand-still too short
 * for the watch.
 */
final class Dispatch {
    private static final Logger LOG = LoggerFactory.getLogger(Dispatch.class);
    /** Triggers and commands waiting for the measuring thread at most. */
    static final int QUEUE = 10_000;
    /**
     * Messages waiting for their {@code line-busy} answer at most. Larger than {@link #QUEUE}: answering busy costs
     * a record row and a publish, not a measurement, yet a flood arrives faster than even that.
     */
    static final int OVERFLOW = 100_000;
    /**
     * How long the line must have been idle for Paho's thread to run a message itself, ns. Messages of a burst reach
     * the callback a few µs apart; a part at the line's pace comes hundreds of µs or more after the last answer.
     */
    static final long QUIET_NANOS = 300_000;
    /**
     * A message that took longer than this, ns (a meter that reads for milliseconds, a change of conditions, a
     * command), keeps the next one off Paho's thread; a run in place that took longer makes the stamps of the messages
     * right behind it its start.
     */
    static final long SHORT_NANOS = 1_000_000;

    /** What a message becomes on the measuring thread, and on the overflow thread when the queue is full. */
    interface Handler {
        /**
         * @param arrivedNanos when the message came (System.nanoTime), or earlier when it may have waited unseen
         * @param ack the message's acknowledgement to the broker, held for the answer when the message went straight to an
         *            idle line: send it right after the answer's publish (it is sent when this returns in any case)
         */
        void handle(byte[] payload, long arrivedNanos, Ack ack);

        /**
         * Called on the submitting (Paho's) thread when the queue is full: reduces the message to the small task
         * that answers it on the overflow thread, so a waiting answer holds a decoded trigger, not the payload.
         */
        Runnable overflow(byte[] payload, long arrivedNanos);

        /**
         * Whether an idle line may run the message on Paho's thread: only for work as short as a part's (a trigger's
         * reading and answer), never for a command that may hold the line for seconds (a compensation's readings).
         */
        default boolean inPlace() { return false; }
    }

    private final ThreadPoolExecutor work, overflow;
    /** Held while any of the line's work runs, on whichever thread: the work stays one piece at a time. */
    private final ReentrantLock turn = new ReentrantLock();
    /** Pieces handed to the queue and not yet finished: a message runs on Paho's thread only when there are none. */
    private final AtomicInteger handedOver = new AtomicInteger();
    private final LongSupplier nanos;
    private final long quietNanos;
    /** When the last piece of work ended. */
    private volatile long idleSince;
    /** How long the last message took to handle, in place or on the measuring thread. */
    private volatile long lastMessageNanos;
    /** The last run in place, start and end (written and read on Paho's callback thread, which a reconnect may replace). */
    private volatile long inPlaceStart, inPlaceEnd;
    /** Tells when the process stood still; started by {@link #watchStalls}. */
    private final StallWatch stalls;
    /**
     * When the last message taken up was dated to a stand-still's start, that start (else {@link Long#MIN_VALUE}), and
     * when Paho's thread was done with it: the next one taken up back to back ({@link #BACK_TO_BACK_NANOS}) had waited
     * behind it and gets the same date. Paho's callback thread only.
     */
    private volatile long stoodStillSince = Long.MIN_VALUE, lastTakenDone;
    /** When the last message was taken up (Paho's callback thread only). */
    private volatile long lastTaken = Long.MIN_VALUE / 4;
    /**
     * Messages waiting in the MQTT client are taken up this close one after another, ns; a handler's reaction to an
     * answer comes a broker's round trip later at the least.
     */
    static final long BACK_TO_BACK_NANOS = 100_000;
    private volatile boolean closing;
    /** Whether the MQTT link can take an answer without waiting (its window has room): never wait on Paho's thread. */
    private volatile BooleanSupplier linkHasRoom = () -> false;

    Dispatch(String line) { this(line, QUIET_NANOS, System::nanoTime); }

    /**
     * @param quietNanos how long the line must have been idle for a message to run on Paho's thread
     * @param nanos      the monotonic clock, ns (System.nanoTime: the handlers compare stamps with it)
     */
    Dispatch(String line, long quietNanos, LongSupplier nanos) {
        this.quietNanos = quietNanos;
        this.nanos = nanos;
        this.idleSince = nanos.getAsLong();
        this.stalls = new StallWatch(nanos);
        overflow = new ThreadPoolExecutor(1, 1, 0, TimeUnit.MILLISECONDS, new ArrayBlockingQueue<>(OVERFLOW),
                r -> Daemon.named(r, "overflow-" + line), (r, ex) -> LOG.error("overflow queue full: a message got no answer"));
        work = new ThreadPoolExecutor(1, 1, 0, TimeUnit.MILLISECONDS, new ArrayBlockingQueue<>(QUEUE),
                r -> Daemon.named(r, "line-" + line), (r, ex) -> {
                    handedOver.decrementAndGet();
                    if (!(r instanceof Job j)) throw new RejectedExecutionException(ex.isShutdown() ? "stopping" : "queue full");
                    j.ack.send(); // not held (the queue was full), unless stopping: the broker hears of it either way
                    if (!ex.isShutdown()) overflow.execute(j.handler.overflow(j.payload, j.arrived));
                });
    }

    /** A piece of the line's work handed to the queue: runs holding the turn. */
    private class Turn implements Runnable {
        private final Runnable task;

        Turn(Runnable task) { this.task = task; }

        public void run() {
            turn.lock();
            try {
                task.run();
            } finally {
                idleSince = nanos.getAsLong();
                turn.unlock();
                handedOver.decrementAndGet();
            }
        }
    }

    private final class Job extends Turn {
        final Handler handler;
        final byte[] payload;
        final long arrived;
        final Ack ack;

        Job(Handler handler, byte[] payload, long arrived, Ack ack) {
            super(() -> {
                long t0 = nanos.getAsLong();
                try {
                    handler.handle(payload, arrived, ack);
                } finally {
                    ack.send();
                    lastMessageNanos = nanos.getAsLong() - t0;
                }
            });
            this.handler = handler;
            this.payload = payload;
            this.arrived = arrived;
            this.ack = ack;
        }
    }

    /** Runs {@link #submit}'s messages on Paho's thread when the line is idle and {@code room} says the link can take the answer. */
    void runIdleMessagesInPlace(BooleanSupplier room) { linkHasRoom = room; }

    /**
     * Paho's thread: runs the message here (see the class) or hands it over without blocking. A message handed to an
     * empty queue holds its acknowledgement until its answer is out (at most two are held at once: the one measured and
     * the one next); one that queues behind others is acknowledged at once, so a flood waits in this queue and is
     * answered, not held back at the broker, whose window of unacknowledged messages to a client is small and whose
     * queue beyond it drops.
     */
    void submit(Handler h, byte[] payload, Ack ack) {
        long now = nanos.getAsLong(), arrived = arrival(now);
        try {
            if (h.inPlace() && lastMessageNanos <= SHORT_NANOS && handedOver.get() == 0 && now - idleSince >= quietNanos && !closing
                    && linkHasRoom.getAsBoolean() && inPlace(h, payload, arrived, ack))
                return;
            if (work.getQueue().isEmpty()) ack.hold();
            handedOver.incrementAndGet();
            try {
                work.execute(new Job(h, payload, arrived, ack));
            } catch (RejectedExecutionException e) {
                LOG.debug("stopping: message dropped"); // the rejection handler counted it off
            }
        } finally {
            lastTakenDone = nanos.getAsLong();
        }
    }

    /**
     * When a message handed over at {@code now} may have come: then, unless a run in place longer than a short one
     * ended just before (within the quiet time or that run's length) — the message may have waited behind it, unseen,
     * and is taken to have come when that run began — or the process stood still just before (the earlier of the two).
     */
    private long arrival(long now) {
        long ran = inPlaceEnd - inPlaceStart;
        long behindRun = ran > SHORT_NANOS && now - inPlaceEnd < Math.max(quietNanos, ran) ? inPlaceStart : now;
        long stood = stalls.mayHaveComeAt(now, lastTaken);
        lastTaken = now;
        if (stood == now && stoodStillSince != Long.MIN_VALUE && now - lastTakenDone <= BACK_TO_BACK_NANOS) stood = stoodStillSince;
        stoodStillSince = stood < now ? stood : Long.MIN_VALUE;
        return Math.min(behindRun, stood);
    }

    /** Starts watching for stand-stills of the process (the daemon does; a test drives {@link #stallWatch} itself). */
    void watchStalls(String line) { stalls.start(line); }

    StallWatch stallWatch() { return stalls; }

    /**
     * Runs the message on this (Paho's) thread if the line is still idle once the turn is ours: nothing handed over
     * may be overtaken. False when it was not run.
     */
    private boolean inPlace(Handler h, byte[] payload, long arrived, Ack ack) {
        if (!turn.tryLock()) return false;
        try {
            if (handedOver.get() != 0 || closing) return false;
            long t0 = nanos.getAsLong();
            ack.hold();
            try {
                h.handle(payload, arrived, ack);
            } catch (RuntimeException e) {
                LOG.error("message handler failed", e);
            } finally {
                ack.send();
                long t1 = nanos.getAsLong();
                inPlaceStart = t0;
                inPlaceEnd = t1;
                lastMessageNanos = t1 - t0;
                idleSince = t1;
            }
            return true;
        } finally {
            turn.unlock();
        }
    }

    /** Runs a task on the measuring thread, between parts; false when the queue is full or stopping. */
    boolean onMeasuringThread(Runnable r) {
        handedOver.incrementAndGet();
        try {
            work.execute(new Turn(r));
            return true;
        } catch (RejectedExecutionException e) {
            return false; // the rejection handler counted it off
        }
    }

    /** Pieces handed to the queue and not yet finished (for tests). */
    int handedOver() { return handedOver.get(); }

    /** Finishes what is queued, then stops. */
    void close() {
        closing = true;
        stalls.stop();
        turn.lock(); // a message running on Paho's thread ends first
        turn.unlock();
        work.shutdown();
        overflow.shutdown();
        try {
            if (!work.awaitTermination(10, TimeUnit.SECONDS)) work.shutdownNow();
            overflow.awaitTermination(5, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
