package net.zbin.io.mqtt;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import net.zbin.app.MosquittoProcess;
import net.zbin.io.LineConfig;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallback;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The link's own outbox through a real Mosquitto that is stopped and started again: what is published while
 * the broker is away arrives after its return, in order, and what is published while the outbox is still
 * being delivered is neither stranded nor reordered. A subscriber with a persistent session on a broker that
 * keeps its sessions across the stop sees every message however the two clients' reconnects interleave.
 */
class MqttLinkOutboxIT {
    @TempDir
    Path dir;

    @Test
    void heldWhileTheBrokerIsAway_deliveredInOrderOnItsReturn_laterPublishesNeverStranded() throws Exception {
        // the broker may drop to its own user: give it a folder it can write its session store to
        Path db = java.nio.file.Files.createDirectory(dir.resolve("db"));
        java.nio.file.Files.setPosixFilePermissions(dir, java.nio.file.attribute.PosixFilePermissions.fromString("rwx--x--x"));
        java.nio.file.Files.setPosixFilePermissions(db, java.nio.file.attribute.PosixFilePermissions.fromString("rwxrwxrwx"));
        String conf = "persistence true\npersistence_location " + db + "/\n";
        try (MosquittoProcess broker = new MosquittoProcess(dir, conf)) {
            List<Integer> got = new CopyOnWriteArrayList<>();
            Subscriber sub = new Subscriber(broker.url(), got);
            LineConfig.MqttSettings s = new LineConfig.MqttSettings(broker.url(), "zbin", "outbox-" + System.nanoTime(), null, null,
                    null, null, null, 2);
            try (MqttLink link = new MqttLink(s, null, null, List.of(), (t, p) -> { })) {
                link.connect(10_000);
                int n = 0;
                List<Integer> heldCounts = new ArrayList<>();
                for (int cycle = 0; cycle < 5; cycle++) {
                    for (int i = 0; i < 200; i++) link.publish("outbox/seq", bytes(n++), 1, false);
                    int before = n;
                    // a clean session loses what is in flight when the broker goes: let these arrive before the stop
                    waitUntil(() -> sub.keptUp() && got.size() >= before, 20_000, () -> "the connected publishes");
                    broker.stop();
                    waitUntil(() -> !link.isConnected(), 10_000, () -> "the link notices the stop");
                    for (int i = 0; i < 500; i++) link.publish("outbox/seq", bytes(n++), 1, false);
                    heldCounts.add(link.buffered());
                    broker.start();
                    // published while the outbox is being delivered, spread over its end: must queue behind it, and go out
                    for (int i = 0; i < 500; i++) {
                        link.publish("outbox/seq", bytes(n++), 1, false);
                        java.util.concurrent.locks.LockSupport.parkNanos(200_000);
                    }
                    int sent = n;
                    waitUntil(() -> sub.keptUp() && got.size() >= sent, 20_000, () -> "all " + sent
                            + " messages at the subscriber: got " + got.size() + ", link holds " + link.buffered() + ", subscriber connected "
                            + sub.isConnected() + ", link connected " + link.isConnected() + "\n" + brokerLog());
                    assertEquals(0, link.buffered(), "nothing left in the outbox once connected");
                }
                for (int h : heldCounts) assertTrue(h >= 500, "held while away (not handed to a client that is down): " + heldCounts);
                assertEquals(n, got.size(), "each message once");
                for (int i = 0; i < n; i++) assertEquals(i, got.get(i), "in publishing order at " + i);
                assertEquals(0, link.notOffered());
            } finally {
                sub.close();
            }
        }
    }

    private String brokerLog() {
        StringBuilder b = new StringBuilder();
        try (var l = java.nio.file.Files.list(dir)) {
            for (Path p : l.filter(x -> x.toString().endsWith(".log")).toList()) b.append(java.nio.file.Files.readString(p));
        } catch (java.io.IOException e) {
            b.append("broker log not readable: ").append(e);
        }
        return b.toString();
    }

    private static byte[] bytes(int n) { return Integer.toString(n).getBytes(StandardCharsets.UTF_8); }

    /** A subscriber whose session (and QoS 1 queue) outlives the broker's restart; it dials again when asked to keep up. */
    private static final class Subscriber implements AutoCloseable {
        final MqttAsyncClient c;
        final MqttConnectOptions o = new MqttConnectOptions();

        Subscriber(String url, List<Integer> got) throws Exception {
            c = new MqttAsyncClient(url, "outbox-sub", new MemoryPersistence());
            c.setCallback(new MqttCallback() {
                public void connectionLost(Throwable t) { }

                public void messageArrived(String topic, MqttMessage m) {
                    int v = Integer.parseInt(new String(m.getPayload(), StandardCharsets.UTF_8));
                    if (m.isDuplicate() && got.contains(v)) return; // a QoS 1 redelivery across the restart
                    got.add(v);
                }

                public void deliveryComplete(IMqttDeliveryToken t) { }
            });
            o.setCleanSession(false);
            o.setMaxInflight(2000);
            c.connect(o).waitForCompletion(10_000);
            c.subscribe("outbox/#", 1).waitForCompletion(10_000);
        }

        /** Always true: dials when not connected (the session brings the subscription back). */
        boolean keptUp() {
            if (!c.isConnected()) {
                try {
                    c.connect(o);
                } catch (Exception e) {
                    // connecting, or the broker is not back yet
                }
            }
            return true;
        }

        boolean isConnected() { return c.isConnected(); }

        @Override
        public void close() throws Exception {
            if (c.isConnected()) c.disconnect().waitForCompletion(2000);
            c.close(true);
        }
    }

    /** Polls {@code ok} until it holds, failing with {@code what} after {@code timeoutMs} (the package's MQTT tests share it). */
    static void waitUntil(java.util.function.BooleanSupplier ok, long timeoutMs, java.util.function.Supplier<String> what)
            throws InterruptedException {
        long end = System.nanoTime() + TimeUnit.MILLISECONDS.toNanos(timeoutMs);
        while (!ok.getAsBoolean()) {
            if (System.nanoTime() > end) throw new AssertionError("timed out: " + what.get());
            Thread.sleep(10);
        }
    }
}
