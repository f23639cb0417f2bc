package net.zbin.io.mqtt;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import net.zbin.app.MosquittoProcess;
import net.zbin.io.LineConfig;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The link's acknowledgements at a real Mosquitto: a held one is really held (the broker, allowed a few unacknowledged
 * messages per client, sends the next only when one is acknowledged), every one is sent once, and one held across a
 * reconnect is not sent on the new connection, where its number would acknowledge another message.
 */
class MqttLinkAckIT {
    @TempDir
    Path dir;

    static final int WINDOW = 5; // the broker's max_inflight_messages below

    static LineConfig.MqttSettings settings(MosquittoProcess broker, String id) {
        return new LineConfig.MqttSettings(broker.url(), "zbin", id + "-" + System.nanoTime(), null, null, null, null, null, 5);
    }

    static MqttAsyncClient publisher(MosquittoProcess broker) throws Exception {
        MqttAsyncClient c = new MqttAsyncClient(broker.url(), "ack-pub-" + System.nanoTime(), new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        // publishes awaited one by one were once refused as "too many publishes in progress" (Paho's default window of
        // 10) in a CI run, against a broker set to max_inflight_messages 5; cause not found. The test needs no window here
        o.setMaxInflight(1000);
        c.connect(o).waitForCompletion(10_000);
        return c;
    }

    @Test
    void heldAcks_holdTheBrokersWindow_untilSent_andEachIsSentOnce() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "max_inflight_messages " + WINDOW + "\n")) {
            var held = new LinkedBlockingQueue<Ack>();
            var marker = new java.util.concurrent.CompletableFuture<Integer>();
            try (MqttLink link = new MqttLink(settings(broker, "ack-hold"), null, null, List.of("line/trigger", "line/marker"), (t, p, ack) -> {
                if (t.equals("line/marker")) {
                    marker.complete(held.size());
                    return; // acknowledged when this returns (a QoS 0 delivery has nothing to acknowledge)
                }
                ack.hold();
                held.add(ack);
            })) {
                link.connect(10_000);
                assertTrue(link.awaitSubscribed(20_000));
                MqttAsyncClient pub = publisher(broker);
                int n = 30;
                var sent = new java.util.ArrayList<org.eclipse.paho.client.mqttv3.IMqttDeliveryToken>();
                for (int i = 0; i < n; i++) sent.add(pub.publish("line/trigger", ("m" + i).getBytes(StandardCharsets.UTF_8), 1, false));
                for (var t : sent) t.waitForCompletion(10_000); // all at the broker before the marker
                // QoS 0 is not held by the broker's window, and arrives behind whatever the broker sent before it
                pub.publish("line/marker", new byte[0], 0, false).waitForCompletion(10_000);
                assertEquals(WINDOW, marker.get(30, TimeUnit.SECONDS), "the broker sent its window and waits for an acknowledgement");
                assertEquals(0, link.acksSent(), "nothing acknowledged while held");
                int heard = 0;
                while (heard < n) {
                    Ack a = held.poll(30, TimeUnit.SECONDS);
                    assertTrue(a != null, "message " + heard + " heard after the ones before it were acknowledged");
                    heard++;
                    a.send();
                    a.send(); // a second call sends nothing
                }
                assertEquals(n, link.acksSent(), "each message acknowledged once");
                assertEquals(0, link.acksStale());
                pub.disconnect().waitForCompletion(5_000);
                pub.close();
            }
        }
    }

    @Test
    void anAckHeldAcrossAReconnect_isNotSentOnTheNewConnection() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "")) {
            var held = new LinkedBlockingQueue<Ack>();
            AtomicInteger subscribedOn = new AtomicInteger();
            try (MqttLink link = new MqttLink(settings(broker, "ack-stale"), null, null, List.of("line/trigger"), (t, p, ack) -> {
                ack.hold();
                held.add(ack);
            })) {
                link.onConnect(subscribedOn::incrementAndGet);
                link.connect(10_000);
                assertTrue(link.awaitSubscribed(20_000));
                MqttAsyncClient pub = publisher(broker);
                pub.publish("line/trigger", "old".getBytes(StandardCharsets.UTF_8), 1, false).waitForCompletion(10_000);
                pub.disconnect().waitForCompletion(5_000);
                pub.close();
                Ack old = held.poll(30, TimeUnit.SECONDS);
                assertTrue(old != null, "heard on the first connection");
                broker.kill();
                broker.start();
                MqttLinkOutboxIT.waitUntil(() -> subscribedOn.get() >= 2, 60_000, () -> "subscribed again after the broker came back");
                MqttAsyncClient pub2 = publisher(broker);
                pub2.publish("line/trigger", "new".getBytes(StandardCharsets.UTF_8), 1, false).waitForCompletion(10_000);
                Ack fresh = held.poll(30, TimeUnit.SECONDS);
                assertTrue(fresh != null, "heard on the new connection");
                old.send();
                assertEquals(1, link.acksStale(), "the old connection's acknowledgement was not sent on the new one");
                assertEquals(0, link.acksSent());
                fresh.send();
                assertEquals(1, link.acksSent());
                pub2.disconnect().waitForCompletion(5_000);
                pub2.close();
            }
        }
    }
}
