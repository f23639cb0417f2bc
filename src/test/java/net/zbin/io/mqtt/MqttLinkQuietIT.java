package net.zbin.io.mqtt;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import net.zbin.app.MosquittoProcess;
import net.zbin.io.LineConfig;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallback;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A connected link hands each publish to the client on the publishing thread; the broker's acknowledgement of it
 * must not wake the outbox thread, which has nothing to do while the broker is there. Each needless wake-up is a
 * thread switch per decision, and on a small machine thread switches are most of what a decision costs.
 */
class MqttLinkQuietIT {
    @TempDir
    Path dir;

    @Test
    void acknowledgementsWhileConnected_doNotWakeTheOutboxThread() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "")) {
            int n = 2000;
            CountDownLatch all = new CountDownLatch(n);
            MqttAsyncClient sub = new MqttAsyncClient(broker.url(), "quiet-sub-" + System.nanoTime(), new MemoryPersistence());
            sub.setCallback(new MqttCallback() {
                public void connectionLost(Throwable t) { }

                public void messageArrived(String topic, MqttMessage m) { all.countDown(); }

                public void deliveryComplete(IMqttDeliveryToken t) { }
            });
            sub.connect().waitForCompletion(10_000);
            sub.subscribe("quiet/#", 1).waitForCompletion(10_000);
            LineConfig.MqttSettings s = new LineConfig.MqttSettings(broker.url(), "zbin", "quiet-" + System.nanoTime(), null, null,
                    null, null, null, 10);
            try (MqttLink link = new MqttLink(s, null, null, List.of(), (t, p) -> { })) {
                link.connect(10_000);
                long t0 = System.nanoTime(), turns0 = link.flusherTurns();
                // paced like parts, so each acknowledgement comes on its own and would wake a listener on its own
                for (int i = 0; i < n; i++) {
                    link.publish("quiet/seq", Integer.toString(i).getBytes(StandardCharsets.UTF_8), 1, false);
                    java.util.concurrent.locks.LockSupport.parkNanos(500_000);
                }
                assertTrue(all.await(60, TimeUnit.SECONDS), "all " + n + " messages at the subscriber: " + all.getCount() + " missing");
                long turns = link.flusherTurns() - turns0;
                double seconds = (System.nanoTime() - t0) / 1e9;
                // the idle outbox thread looks again every 100 ms of its own accord: allow that, and a margin; a publish that
                // found the in-flight window full (not expected at this pace, but a stalled broker on a loaded machine can
                // fill it) waits, and the acknowledgement that frees it wakes every waiter on the link's lock
                long allowed = Math.round(seconds * 10) + 20 + 2 * link.waits();
                assertTrue(turns <= allowed, "the outbox thread turned " + turns + " times for " + n + " acknowledged publishes in "
                        + String.format("%.1f", seconds) + " s (allowed " + allowed + ")");
            } finally {
                sub.disconnect().waitForCompletion(5_000);
                sub.close();
            }
        }
    }
}
