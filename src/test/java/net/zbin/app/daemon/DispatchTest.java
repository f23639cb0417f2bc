package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicIntegerArray;
import net.zbin.io.mqtt.Ack;
import org.junit.jupiter.api.Test;

/**
 * The hand-over holds a message's acknowledgement to the broker only while nothing waits before it: a flood must queue
 * here (and be answered), not at the broker, which sends a client only a few unacknowledged messages at a time and
 * drops what queues beyond its limit.
 */
class DispatchTest {
    @Test
    void onlyAMessageThatFindsNothingWaiting_holdsItsAck_andEveryAckIsSentOnce() throws Exception {
        Dispatch d = new Dispatch("dispatch-test");
        int n = 50;
        AtomicIntegerArray sends = new AtomicIntegerArray(n);
        CountDownLatch release = new CountDownLatch(1), done = new CountDownLatch(n);
        List<Ack> acks = new ArrayList<>();
        Dispatch.Handler blocking = new Dispatch.Handler() {
            public void handle(byte[] p, long at, Ack ack) {
                try {
                    assertTrue(release.await(60, TimeUnit.SECONDS));
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
                done.countDown();
            }

            public Runnable overflow(byte[] p, long at) { return () -> { }; }
        };
        try {
            for (int i = 0; i < n; i++) {
                int k = i;
                Ack a = Ack.of(() -> sends.incrementAndGet(k));
                acks.add(a);
                d.submit(blocking, new byte[] {(byte) i}, a);
                if (!a.held()) a.send(); // as the MQTT link does when the handler returns without holding it
            }
            // the first starts the measuring thread (and waits there), the second finds an empty queue, the rest queue behind it
            assertTrue(acks.get(0).held() && acks.get(1).held(), "the one measured and the one next hold their acknowledgements");
            for (int i = 2; i < n; i++) assertFalse(acks.get(i).held(), "message " + i + " queued behind others: acknowledged at once");
            assertEquals(0, sends.get(0) + sends.get(1), "held until their answers");
            release.countDown();
            assertTrue(done.await(60, TimeUnit.SECONDS));
        } finally {
            release.countDown();
            d.close();
        }
        for (int i = 0; i < n; i++) assertEquals(1, sends.get(i), "message " + i + " acknowledged once");
    }

    @Test
    void aHandlerThatThrows_stillSendsTheHeldAck() throws Exception {
        Dispatch d = new Dispatch("dispatch-throws");
        CountDownLatch sent = new CountDownLatch(1);
        Ack a = Ack.of(sent::countDown);
        Dispatch.Handler failing = new Dispatch.Handler() {
            public void handle(byte[] p, long at, Ack ack) { throw new IllegalStateException("handler failed"); }

            public Runnable overflow(byte[] p, long at) { return () -> { }; }
        };
        try {
            d.submit(failing, new byte[0], a);
            assertTrue(a.held());
            assertTrue(sent.await(60, TimeUnit.SECONDS), "the acknowledgement went out although the handler failed");
        } finally {
            d.close();
        }
    }
}
