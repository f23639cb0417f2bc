package net.zbin.app;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import java.util.function.Predicate;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallback;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/** A test's own MQTT client: records every message under a filter, and publishes raw payloads. */
public final class Tap implements AutoCloseable {
    public record Msg(String topic, JsonNode json, String raw, boolean retained) {}

    private static final ObjectMapper M = new ObjectMapper();
    private final MqttAsyncClient c;
    public final List<Msg> msgs = new CopyOnWriteArrayList<>();

    public Tap(String broker, String... filters) throws Exception { this(broker, null, null, filters, true); }

    /** A tap that logs in with a user name and password. */
    public static Tap login(String broker, String user, String password, String... filters) throws Exception {
        return new Tap(broker, user, password, filters, true);
    }

    private Tap(String broker, String user, String password, String[] filters, boolean unused) throws Exception {
        c = new MqttAsyncClient(broker, "tap-" + System.nanoTime(), new MemoryPersistence());
        c.setCallback(new MqttCallback() {
            public void connectionLost(Throwable t) { }

            public void messageArrived(String topic, MqttMessage m) {
                String raw = new String(m.getPayload(), StandardCharsets.UTF_8);
                JsonNode j;
                try {
                    j = M.readTree(raw);
                } catch (Exception e) {
                    j = null;
                }
                msgs.add(new Msg(topic, j, raw, m.isRetained()));
            }

            public void deliveryComplete(IMqttDeliveryToken t) { }
        });
        MqttConnectOptions o = new MqttConnectOptions();
        o.setMaxInflight(2000);
        o.setCleanSession(true);
        // TCP_NODELAY, as the daemon and the handler simulator: a trigger is not held back by Nagle for a delayed ACK
        if (broker.startsWith("tcp://")) o.setSocketFactory(net.zbin.io.mqtt.NoDelaySockets.plain());
        if (user != null) {
            o.setUserName(user);
            o.setPassword(password.toCharArray());
        }
        // A broker that has just bound its port, or a loaded Moquette, may drop the connection at CONNECT or at the
        // SUBSCRIBE right after it: dial again, briefly.
        int[] qos = new int[filters.length];
        java.util.Arrays.fill(qos, 1);
        net.zbin.sim.BrokerDial.connectAndSubscribe(c, o, filters, qos, 10_000);
    }

    public void publish(String topic, byte[] payload) throws Exception { c.publish(topic, payload, 1, false); }

    /** Publishes and waits for the broker's acknowledgement: the broker has handled the message (also when its ACL drops it). */
    public void publishAcknowledged(String topic, String payload) throws Exception {
        c.publish(topic, payload.getBytes(StandardCharsets.UTF_8), 1, false).waitForCompletion(10_000);
    }

    /** Publishes, waiting out a full in-flight window (a burst faster than the broker acknowledges). */
    public void publishWaiting(String topic, String payload) throws Exception {
        byte[] b = payload.getBytes(StandardCharsets.UTF_8);
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(60);
        while (true) {
            try {
                c.publish(topic, b, 1, false);
                return;
            } catch (org.eclipse.paho.client.mqttv3.MqttException e) {
                if (e.getReasonCode() != org.eclipse.paho.client.mqttv3.MqttException.REASON_CODE_MAX_INFLIGHT || System.nanoTime() > end) throw e;
                Thread.sleep(1);
            }
        }
    }

    public void publish(String topic, String payload) throws Exception { publish(topic, payload.getBytes(StandardCharsets.UTF_8)); }

    public List<Msg> on(String topicSuffix) { return msgs.stream().filter(m -> m.topic().endsWith(topicSuffix)).toList(); }

    /** Waits until {@code count} messages match, or fails after the timeout. */
    public List<Msg> await(Predicate<Msg> p, int count, long timeoutMs) throws InterruptedException {
        return awaitFrom(0, p, count, timeoutMs);
    }

    /**
     * Waits until {@code count} messages at index {@code from} or later match, or fails after the timeout. By place in
     * {@link #msgs}, not by {@code indexOf}: a message equal to an earlier one (a repeat answer sent again, the same state
     * payload) is a message of its own, and is counted where it came.
     */
    public List<Msg> awaitFrom(int from, Predicate<Msg> p, int count, long timeoutMs) throws InterruptedException {
        long end = System.nanoTime() + TimeUnit.MILLISECONDS.toNanos(timeoutMs);
        while (true) {
            List<Msg> all = msgs; // a CopyOnWriteArrayList: the stream below reads one snapshot
            List<Msg> got = all.stream().skip(from).filter(p).toList();
            if (got.size() >= count) return got;
            if (System.nanoTime() > end) throw new AssertionError("waited " + timeoutMs + " ms for " + count + " messages after #" + from + ", got "
                    + got.size() + "; last: " + (all.isEmpty() ? "none" : all.get(all.size() - 1)));
            Thread.sleep(10);
        }
    }

    /**
     * Presents one part on {@code line} as a handler does: the trigger ({@code seq}, part "P" + seq), then its answer
     * before the next part. A part answered {@code stale-trigger} (not measured: on a loaded machine a decision can take
     * longer than the deadline) is presented again, as a handler does, 20 times at most, so what a test counts does not
     * depend on the machine's speed: with the same seq, so 60 ms after the answer (the line answers a copy taken up within
     * 50 ms after a {@code stale-trigger} answer as one sent before it, with that answer again). The tap must hear the
     * line's decisions; returns the last answer.
     */
    public JsonNode present(String line, long seq) throws Exception {
        return present(line, seq, "{\"seq\":" + seq + ",\"part\":\"P" + seq + "\"}");
    }

    /** As {@link #present(String, long)}, with the trigger's whole payload given ({@code seq} must be its seq). */
    public JsonNode present(String line, long seq, String trigger) throws Exception {
        return againWhileStale(() -> {
            int mark = msgs.size();
            publish("zbin/" + line + "/trigger", trigger);
            return awaitAfter(mark, m -> m.topic().endsWith("/decision") && m.json() != null && m.json().path("seq").asLong() == seq, 30_000).json();
        });
    }

    /**
     * The re-presentation rule of {@link #present(String, long)} for any way of presenting a part once: {@code once} again,
     * 60 ms after its answer, while that answer is {@code stale-trigger}, 20 times at most; returns the last answer.
     */
    public static JsonNode againWhileStale(java.util.concurrent.Callable<JsonNode> once) throws Exception {
        for (int attempt = 1; ; attempt++) {
            JsonNode a = once.call();
            if (!a.path("reason").asText().equals("stale-trigger") || attempt == 20) return a;
            Thread.sleep(60);
        }
    }

    /** The first message at index {@code from} or later that matches; polls every millisecond, scanning only what is new. */
    public Msg awaitAfter(int from, Predicate<Msg> p, long timeoutMs) throws InterruptedException {
        long end = System.nanoTime() + TimeUnit.MILLISECONDS.toNanos(timeoutMs);
        int i = from;
        while (true) {
            for (int n = msgs.size(); i < n; i++) if (p.test(msgs.get(i))) return msgs.get(i);
            if (System.nanoTime() > end) throw new AssertionError("waited " + timeoutMs + " ms for a message after #" + from + "; last: "
                    + (msgs.isEmpty() ? "none" : msgs.get(msgs.size() - 1)));
            Thread.sleep(1);
        }
    }

    @Override
    public void close() throws Exception {
        if (c.isConnected()) c.disconnect().waitForCompletion(2000);
        c.close(true);
    }
}
