package net.zbin.app.daemon;

import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.RejectedExecutionException;
import java.util.concurrent.ThreadPoolExecutor;
import java.util.concurrent.TimeUnit;
import net.zbin.io.mqtt.Ack;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The hand-over from Paho's thread to the one measuring thread, through a bounded queue. A trigger
 * beyond the queue is answered at once ({@code line-busy}, not measured) by the overflow thread, so the
 * handler always gets an answer and memory stays bounded whatever a client sends.
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

    /** What a message becomes on the measuring thread, and on the overflow thread when the queue is full. */
    interface Handler {
        /**
         * @param ack the message's acknowledgement to the broker, held for the answer when the message went straight to an
         *            idle measuring thread: send it right after the answer's publish (it is sent when this returns in any case)
         */
        void handle(byte[] payload, long arrivedNanos, Ack ack);

        /**
         * Called on the submitting (Paho's) thread when the queue is full: reduces the message to the small task
         * that answers it on the overflow thread, so a waiting answer holds a decoded trigger, not the payload.
         */
        Runnable overflow(byte[] payload, long arrivedNanos);
    }

    private final ThreadPoolExecutor work, overflow;

    Dispatch(String line) {
        overflow = new ThreadPoolExecutor(1, 1, 0, TimeUnit.MILLISECONDS, new ArrayBlockingQueue<>(OVERFLOW),
                r -> Daemon.named(r, "overflow-" + line), (r, ex) -> LOG.error("overflow queue full: a message got no answer"));
        work = new ThreadPoolExecutor(1, 1, 0, TimeUnit.MILLISECONDS, new ArrayBlockingQueue<>(QUEUE),
                r -> Daemon.named(r, "line-" + line), (r, ex) -> {
                    if (!(r instanceof Job j)) return;
                    j.ack.send(); // not held (the queue was full), unless stopping: the broker hears of it either way
                    if (!ex.isShutdown()) overflow.execute(j.handler.overflow(j.payload, j.arrived));
                });
    }

    private record Job(Handler handler, byte[] payload, long arrived, Ack ack) implements Runnable {
        public void run() {
            try {
                handler.handle(payload, arrived, ack);
            } finally {
                ack.send();
            }
        }
    }

    /**
     * Paho's thread: hands over, never blocks. A message that finds nothing waiting holds its acknowledgement until its
     * answer is out (at most two are held at once: the one measured and the one next); one that queues behind others
     * is acknowledged at once, so a flood waits in this queue and is answered, not held back at the broker, whose
     * window of unacknowledged messages to a client is small and whose queue beyond it drops.
     */
    void submit(Handler h, byte[] payload, Ack ack) {
        if (work.getQueue().isEmpty()) ack.hold();
        try {
            work.execute(new Job(h, payload, System.nanoTime(), ack));
        } catch (RejectedExecutionException e) {
            LOG.debug("stopping: message dropped");
        }
    }

    /** Runs a task on the measuring thread, between parts; false when the queue is full or stopping. */
    boolean onMeasuringThread(Runnable r) {
        try {
            work.execute(r);
            return true;
        } catch (RejectedExecutionException e) {
            return false;
        }
    }

    /** Finishes what is queued, then stops. */
    void close() {
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
