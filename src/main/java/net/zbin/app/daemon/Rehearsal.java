package net.zbin.app.daemon;

import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import net.zbin.io.meter.MeterException;
import net.zbin.io.meter.MeterSession;
import net.zbin.io.mqtt.MqttLink;
import net.zbin.io.mqtt.Topics;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The start's rehearsal of a part's way through the line, before the line says ready: the daemon sends itself a
 * trigger-shaped message through the broker ({@link Topics#rehearsalAsk}); Paho's thread hands it to the measuring
 * thread as it would a trigger; there the meter takes one reading under the conditions the probe applied (thrown
 * away: never graded, recorded or counted) and an answer goes out through the broker ({@link Topics#rehearsalAnswer})
 * as a decision would; its arrival starts the next round. The warm-up ({@link Warmup}) cannot run these — the
 * broker's client, the hand-over and the meter link are real I/O — and a fresh process ran them in the interpreter for
 * its first real parts. Bounded by rounds and time; a meter that refuses a reading (an open fixture may read as an
 * overload) ends the readings, not the rehearsal; a broker that refuses the topics ends it at once.
 */
final class Rehearsal {
    private static final Logger LOG = LoggerFactory.getLogger(Rehearsal.class);
    /** Rounds at most: enough for the compiler's first tier on the way's code. */
    static final int MAX_ROUNDS = 600;
    /** How long past the time bound the last round's answer is waited for. */
    static final long LAST_ANSWER_MS = 100;
    /** What an answer carries: about a decision's size. */
    private static final byte[] ANSWER = ("{\"rehearsal\":true,\"bin\":\"none\",\"note\":\"sent by the line to itself before it says ready;"
            + " nothing was measured for a part, graded or recorded\",\"pad\":\"" + "-".repeat(160) + "\"}").getBytes(java.nio.charset.StandardCharsets.UTF_8);

    private final Topics topics;
    private final MqttLink mqtt;
    private final Dispatch dispatch;
    private final MeterSession meter;
    private final java.util.function.BooleanSupplier asTriggers;
    private volatile CompletableFuture<Void> answered;
    /**
     * The ask of the round under way, handed to the measuring thread once; null between hand-over and the next round and
     * after the rehearsal. Only it makes the line take a reading: another client's messages on the topic (or a copy of
     * the ask) are dropped on Paho's thread, so nothing sent there can keep the measuring thread and the meter busy.
     */
    private final java.util.concurrent.atomic.AtomicReference<byte[]> awaited = new java.util.concurrent.atomic.AtomicReference<>();
    /** Measuring thread only: false once the meter refused a reading. */
    private boolean measuring;
    /** Readings taken (written by the measuring thread, read after the rounds). */
    private final java.util.concurrent.atomic.AtomicLong readings = new java.util.concurrent.atomic.AtomicLong();

    /**
     * @param measure whether the meter takes readings (false when the probe found the link down or the setup refused)
     * @param asTriggers whether a trigger would now run on Paho's thread: the rounds go the way a part goes
     */
    Rehearsal(Topics topics, MqttLink mqtt, Dispatch dispatch, MeterSession meter, boolean measure, java.util.function.BooleanSupplier asTriggers) {
        this.asTriggers = asTriggers;
        this.topics = topics;
        this.mqtt = mqtt;
        this.dispatch = dispatch;
        this.meter = meter;
        this.measuring = measure;
    }

    /** Paho's thread: true when the message is the rehearsal's (handed on, never blocking). */
    boolean heard(String topic, byte[] payload, net.zbin.io.mqtt.Ack ack) {
        if (topic.equals(topics.rehearsalAsk())) {
            byte[] ask = awaited.get();
            if (ask != null && java.util.Arrays.equals(ask, payload) && awaited.compareAndSet(ask, null)) dispatch.submit(onMeasuringThread, payload, ack);
            return true;
        }
        if (topic.equals(topics.rehearsalAnswer())) {
            var f = answered;
            if (f != null) f.complete(null);
            return true;
        }
        return false;
    }

    private final Dispatch.Handler onMeasuringThread = new Dispatch.Handler() {
        public void handle(byte[] payload, long arrivedNanos, net.zbin.io.mqtt.Ack ack) {
            if (measuring) {
                try {
                    meter.measure();
                    readings.incrementAndGet();
                } catch (MeterException | RuntimeException e) {
                    measuring = false;
                    LOG.debug("rehearsal: no more readings ({})", e.toString());
                }
            }
            mqtt.publish(topics.rehearsalAnswer(), ANSWER, 1, false);
        }

        public Runnable overflow(byte[] payload, long arrivedNanos) { return () -> { }; }

        public boolean inPlace() { return asTriggers.getAsBoolean(); }
    };

    /** Runs rounds, one at a time, for up to {@code maxMs}; returns the rounds answered. */
    int run(long maxMs) {
        long end = System.nanoTime() + maxMs * 1_000_000L;
        List<String> both = List.of(topics.rehearsalAsk(), topics.rehearsalAnswer());
        if (!mqtt.subscribeHere(both, maxMs)) {
            LOG.info("rehearsal skipped: the broker did not grant {} (the line's account needs them, see the README)", both);
            return 0;
        }
        int rounds = 0;
        try {
            for (; rounds < MAX_ROUNDS && System.nanoTime() < end; rounds++) {
                var f = new CompletableFuture<Void>();
                answered = f;
                byte[] ask = Warmup.trigger(rounds); // each round's ask differs (its seq)
                awaiting(ask);
                mqtt.publish(topics.rehearsalAsk(), ask, 1, false);
                // the round ends with its answer: nothing of the rehearsal is left on its way when the line says ready
                f.get(Math.max(end - System.nanoTime(), 0) + LAST_ANSWER_MS * 1_000_000L, TimeUnit.NANOSECONDS);
            }
        } catch (java.util.concurrent.TimeoutException e) {
            LOG.debug("rehearsal: round {} unanswered", rounds);
        } catch (java.util.concurrent.ExecutionException e) {
            LOG.debug("rehearsal: {}", e.toString());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        } finally {
            answered = null;
            awaited.set(null);
        }
        // The subscriptions stay for this connection (the broker drops them with it: clean session); from now on the
        // daemon ignores what comes there. Unsubscribing would race the acknowledgement of the last answer, which Paho
        // sends only after its callback returned, and the embedded broker is known to mishandle such a late
        // acknowledgement (io.netty IllegalReferenceCountException in Moquette 0.17's session loop).
        return rounds;
    }

    /** The ask the next hand-over must carry. */
    void awaiting(byte[] ask) { awaited.set(ask); }

    /** Readings the meter took so far (a round still on the measuring thread may add one). */
    long readings() { return readings.get(); }
}
