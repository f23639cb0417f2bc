package net.zbin.io.mqtt;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.DataInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.CompletableFuture;
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
 * A broker that drops the connection on which the line subscribes the moment it is accepted (the embedded Moquette
 * does so on a loaded machine: "SUBSCRIBE received on already closed connection"), played by a proxy in front of a
 * real Mosquitto that closes the first client connection when its SUBSCRIBE comes. {@code awaitSubscribed} returns
 * only once a later connection's subscription was acknowledged, the connect callback (where the daemon says "ready")
 * runs only for that connection, and from then on another client's message is heard.
 */
class MqttLinkSubscribeIT {
    @TempDir
    Path dir;

    /** Forwards MQTT packets both ways; drops the first connection at its first SUBSCRIBE packet. */
    static final class DropFirstSubscribe implements AutoCloseable {
        final ServerSocket server = new ServerSocket(0, 8, InetAddress.getLoopbackAddress());
        final AtomicInteger connections = new AtomicInteger(), dropped = new AtomicInteger();
        private final int brokerPort;

        DropFirstSubscribe(int brokerPort) throws IOException {
            this.brokerPort = brokerPort;
            Thread t = new Thread(this::accept, "proxy");
            t.setDaemon(true);
            t.start();
        }

        String url() { return "tcp://127.0.0.1:" + server.getLocalPort(); }

        private void accept() {
            while (!server.isClosed()) {
                try {
                    Socket c = server.accept();
                    Socket b = new Socket(InetAddress.getLoopbackAddress(), brokerPort);
                    boolean first = connections.incrementAndGet() == 1;
                    daemon(() -> pump(b.getInputStream(), c.getOutputStream()), c, b);
                    daemon(() -> packets(c.getInputStream(), b.getOutputStream(), first), c, b);
                } catch (IOException e) {
                    return;
                }
            }
        }

        interface Io { void run() throws IOException; }

        private static void daemon(Io io, Socket a, Socket b) {
            Thread t = new Thread(() -> {
                try {
                    io.run();
                } catch (IOException ignored) {
                    // a side closed
                } finally {
                    close(a);
                    close(b);
                }
            });
            t.setDaemon(true);
            t.start();
        }

        private static void close(Socket s) {
            try {
                s.close();
            } catch (IOException ignored) {
                // closing
            }
        }

        private static void pump(InputStream in, OutputStream out) throws IOException {
            byte[] buf = new byte[8192];
            for (int n; (n = in.read(buf)) > 0; ) {
                out.write(buf, 0, n);
                out.flush();
            }
        }

        /** Client to broker, packet by packet (MQTT 3.1.1 §2.2: type byte, remaining length in 1–4 bytes, body). */
        private void packets(InputStream raw, OutputStream out, boolean dropAtSubscribe) throws IOException {
            DataInputStream in = new DataInputStream(raw);
            while (true) {
                int type = in.readUnsignedByte();
                java.io.ByteArrayOutputStream packet = new java.io.ByteArrayOutputStream();
                packet.write(type);
                int len = 0, shift = 0, b;
                do {
                    b = in.readUnsignedByte();
                    packet.write(b);
                    len |= (b & 0x7f) << shift;
                    shift += 7;
                } while ((b & 0x80) != 0);
                byte[] body = new byte[len];
                in.readFully(body);
                packet.write(body);
                if (dropAtSubscribe && (type & 0xf0) == 0x80) { // SUBSCRIBE (MQTT 3.1.1 §3.8)
                    dropped.incrementAndGet();
                    throw new IOException("dropped at SUBSCRIBE");
                }
                out.write(packet.toByteArray());
                out.flush();
            }
        }

        @Override
        public void close() throws IOException { server.close(); }
    }

    /** Another client, straight to the broker: publishes one message at QoS 1, waits for its acknowledgement, leaves. */
    static void publishFromAnotherClient(String brokerUrl, String topic, String text) throws Exception {
        MqttAsyncClient other = new MqttAsyncClient(brokerUrl, "other-" + System.nanoTime(), new MemoryPersistence());
        other.connect(new MqttConnectOptions()).waitForCompletion(10_000);
        other.publish(topic, text.getBytes(StandardCharsets.UTF_8), 1, false).waitForCompletion(10_000);
        other.disconnect().waitForCompletion(5_000);
        other.close();
    }

    @Test
    void aConnectionDroppedAtItsSubscribe_awaitSubscribedWaitsForTheNextOnes_thenAnotherClientIsHeard() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             DropFirstSubscribe proxy = new DropFirstSubscribe(broker.port)) {
            CompletableFuture<String> heard = new CompletableFuture<>();
            LineConfig.MqttSettings s = new LineConfig.MqttSettings(proxy.url(), "zbin", "sub-" + System.nanoTime(), null, null,
                    null, null, null, 5);
            try (MqttLink link = new MqttLink(s, null, null, List.of("line/trigger"),
                    (t, p) -> heard.complete(new String(p, StandardCharsets.UTF_8)))) {
                AtomicInteger announced = new AtomicInteger();
                link.onConnect(announced::incrementAndGet); // the daemon says "ready" here
                link.connect(10_000);
                assertTrue(link.awaitSubscribed(20_000), "subscribed on a later connection");
                assertEquals(1, proxy.dropped.get(), "the first connection was dropped at its SUBSCRIBE");
                assertTrue(proxy.connections.get() >= 2, "the link dialled again");
                assertEquals(1, announced.get(), "the connection dropped before its subscription was acknowledged announced nothing");
                publishFromAnotherClient(broker.url(), "line/trigger", "part 1");
                assertEquals("part 1", heard.get(10, TimeUnit.SECONDS), "right after awaitSubscribed, another client's message is heard");
            }
        }
    }
    @Test
    void aTestOrSimulatorClientDroppedAtItsSubscribe_dialsAgainAndHears() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             DropFirstSubscribe proxy = new DropFirstSubscribe(broker.port)) {
            CompletableFuture<String> heard = new CompletableFuture<>();
            MqttAsyncClient c = new MqttAsyncClient(proxy.url(), "dial-" + System.nanoTime(), new MemoryPersistence());
            c.setCallback(new org.eclipse.paho.client.mqttv3.MqttCallback() {
                public void connectionLost(Throwable t) { }

                public void messageArrived(String topic, org.eclipse.paho.client.mqttv3.MqttMessage m) {
                    heard.complete(new String(m.getPayload(), StandardCharsets.UTF_8));
                }

                public void deliveryComplete(org.eclipse.paho.client.mqttv3.IMqttDeliveryToken t) { }
            });
            net.zbin.sim.BrokerDial.connectAndSubscribe(c, new MqttConnectOptions(), new String[] {"line/decision"}, new int[] {1}, 10_000);
            assertEquals(1, proxy.dropped.get(), "the first connection was dropped at its SUBSCRIBE");
            assertEquals(2, proxy.connections.get(), "dialled once more");
            publishFromAnotherClient(broker.url(), "line/decision", "bin 3");
            assertEquals("bin 3", heard.get(10, TimeUnit.SECONDS), "subscribed on the second connection");
            c.disconnect().waitForCompletion(5_000);
            c.close();
        }
    }

    @Test
    void withoutDiallingAgain_theDroppedSubscribeFails_soTheProxyReallyDrops() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             DropFirstSubscribe proxy = new DropFirstSubscribe(broker.port)) {
            MqttAsyncClient c = new MqttAsyncClient(proxy.url(), "plain-" + System.nanoTime(), new MemoryPersistence());
            c.connect(new MqttConnectOptions()).waitForCompletion(10_000);
            org.eclipse.paho.client.mqttv3.MqttException e = org.junit.jupiter.api.Assertions.assertThrows(
                    org.eclipse.paho.client.mqttv3.MqttException.class, () -> c.subscribe("line/decision", 1).waitForCompletion(10_000));
            assertEquals(org.eclipse.paho.client.mqttv3.MqttException.REASON_CODE_CONNECTION_LOST, e.getReasonCode(), e.toString());
            c.close(true);
        }
    }
    @Test
    void heldSubscriptions_areRequestedOnlyOnHear_andTheConnectWaitsOnNoSleepingThread() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "")) {
            var heard = new java.util.concurrent.LinkedBlockingQueue<String>();
            LineConfig.MqttSettings s = new LineConfig.MqttSettings(broker.url(), "zbin", "held-" + System.nanoTime(), null, null,
                    null, null, null, 5);
            try (MqttLink link = new MqttLink(s, null, null, List.of("line/trigger"), (t, p) -> heard.add(new String(p, StandardCharsets.UTF_8)))) {
                AtomicInteger announced = new AtomicInteger();
                link.onConnect(announced::incrementAndGet);
                link.holdSubscriptions();
                link.connect(10_000);
                assertTrue(link.isConnected());
                // Paho's receiver, sender and callback each found running at their first check (no 100 ms sleep); a Paho
                // whose start differs would count here as plain
                assertEquals(3, link.threads.prompt.get(), "Paho workers started promptly");
                assertEquals(0, link.threads.plain.get(), "Paho workers started the slow way");
                // acknowledged to its publisher before hear(): had the link been subscribed, it would be delivered first
                publishFromAnotherClient(broker.url(), "line/trigger", "before hear");
                assertEquals(0, announced.get(), "held: the connect callback waits for the subscriptions");
                link.hear();
                assertTrue(link.awaitSubscribed(10_000));
                link.hear(); // a second call on the same connection requests nothing more
                publishFromAnotherClient(broker.url(), "line/trigger", "after hear");
                assertEquals("after hear", heard.poll(10, TimeUnit.SECONDS), "heard from hear() on, nothing from before");
                assertEquals(1, announced.get(), "one announcement for the connection");
            }
        }
    }
}
