package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import net.zbin.core.Reading;
import net.zbin.core.TestConditions;
import net.zbin.io.LineConfig;
import net.zbin.io.meter.MeterReading;
import net.zbin.io.meter.MeterSession;
import net.zbin.io.mqtt.MqttLink;
import net.zbin.io.mqtt.Topics;
import org.junit.jupiter.api.Test;

/** Only the rehearsal's own ask, once, makes the line take a reading: a client that floods the topic gets nothing measured. */
class RehearsalTest {
    static final class Counting implements MeterSession {
        final AtomicLong readings = new AtomicLong();

        public String identify() { return "counting"; }

        public void apply(TestConditions c) { }

        public MeterReading measure() {
            readings.incrementAndGet();
            return new MeterReading(new Reading(1000, 0.1, -1000), 0);
        }

        public long reconnects() { return 0; }

        public long unaskedBytes() { return 0; }

        public void close() { }
    }

    /** Waits until the measuring thread did what was handed to it before this call. */
    static void drained(Dispatch d) throws Exception {
        var f = new CompletableFuture<Void>();
        assertTrue(d.onMeasuringThread(() -> f.complete(null)));
        f.get(10, TimeUnit.SECONDS);
    }

    @Test
    void strangersAsksAndCopies_areDropped_onlyTheRoundsOwnAskIsMeasuredOnce() throws Exception {
        Topics topics = new Topics("zbin", "reh");
        Dispatch dispatch = new Dispatch("reh-test");
        Counting meter = new Counting();
        // never connected: the answer waits in the link's outbox, which is all this test needs of it
        var s = new LineConfig.MqttSettings("tcp://127.0.0.1:1", "zbin", "reh-" + System.nanoTime(), null, null, null, null, null, 5);
        try (MqttLink link = new MqttLink(s, null, null, List.of(), (t, p) -> { })) {
            Rehearsal r = new Rehearsal(topics, link, dispatch, meter, true, () -> true);
            for (int i = 0; i < 1000; i++) assertTrue(r.heard(topics.rehearsalAsk(), Warmup.trigger(i), net.zbin.io.mqtt.Ack.NONE), "the rehearsal's topic is its own");
            drained(dispatch);
            assertEquals(0, meter.readings.get(), "no round under way: nothing measured");
            byte[] ask = Warmup.trigger(7);
            r.awaiting(ask);
            for (int i = 0; i < 1000; i++) r.heard(topics.rehearsalAsk(), Warmup.trigger(i == 7 ? 8 : i), net.zbin.io.mqtt.Ack.NONE); // everything but the ask
            r.heard(topics.rehearsalAsk(), ask.clone(), net.zbin.io.mqtt.Ack.NONE);
            r.heard(topics.rehearsalAsk(), ask.clone(), net.zbin.io.mqtt.Ack.NONE); // a copy of it
            drained(dispatch);
            assertEquals(1, meter.readings.get(), "the round's own ask, once");
            assertEquals(1, r.readings());
            assertTrue(!r.heard(topics.trigger(), ask, net.zbin.io.mqtt.Ack.NONE), "a trigger is not the rehearsal's");
        } finally {
            dispatch.close();
        }
    }
}
