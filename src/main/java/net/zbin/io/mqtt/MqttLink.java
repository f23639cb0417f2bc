package net.zbin.io.mqtt;

import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.function.BiConsumer;
import javax.net.ssl.SSLContext;
import net.zbin.io.LineConfig;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.IMqttToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallbackExtended;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The daemon's MQTT connection (Paho mqttv3 async). Pitfalls handled: memory persistence (no files
 * in the working folder), in-flight window well above the default 10, resubscribe on every connect
 * without blocking the callback thread, a retained Will, TCP_NODELAY sockets. {@code messageArrived}
 * only hands the message on.
 *
 * <p>Session policy: a clean session under a client id that is stable per line. Nothing is queued for
 * zbin at the broker while it is away, so no trigger sent before a reconnect is delivered afterwards,
 * when its part may have moved; the handler's retry is the trigger that counts, and it is answered
 * from the decision book if it was decided, or measured now (the part is still on the contacts, the
 * handler is waiting for it). No decision is discarded: a full in-flight window makes the publisher
 * wait, and while the broker is away publishes go to a bounded offline buffer that is delivered on
 * reconnect (a full buffer makes the publisher wait too). After a lost connection a reconnect is tried
 * every {@value #RECONNECT_EVERY_MS} ms, so the line is subscribed again a fraction of a second after
 * the broker returns.
 */
public final class MqttLink implements Publisher, AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(MqttLink.class);
    public static final int MAX_INFLIGHT = 1000;
    /** Messages held while the broker is away. */
    public static final int OFFLINE_BUFFER = 50_000;
    static final long RECONNECT_EVERY_MS = 100;

    private final MqttAsyncClient client;
    private final MqttConnectOptions options;
    private final List<String> subscriptions;
    private final BiConsumer<String, byte[]> onMessage;
    private volatile Runnable onConnect = () -> { };
    private final Object window = new Object();
    private final java.util.concurrent.ScheduledExecutorService redial;
    private final java.util.concurrent.atomic.AtomicLong waits = new java.util.concurrent.atomic.AtomicLong();
    private final java.util.concurrent.atomic.AtomicLong notOffered = new java.util.concurrent.atomic.AtomicLong();
    private volatile boolean closing;

    /**
     * @param onMessage receives (topic, payload) on Paho's thread: must not block
     */
    public MqttLink(LineConfig.MqttSettings s, String willTopic, byte[] willPayload, List<String> subscriptions,
                    BiConsumer<String, byte[]> onMessage) throws Exception {
        this.subscriptions = List.copyOf(subscriptions);
        this.onMessage = onMessage;
        this.client = new MqttAsyncClient(s.broker(), s.clientId(), new MemoryPersistence());
        options = new MqttConnectOptions();
        options.setMqttVersion(MqttConnectOptions.MQTT_VERSION_3_1_1);
        options.setCleanSession(true);
        options.setAutomaticReconnect(true);
        options.setMaxReconnectDelay(1000);
        options.setConnectionTimeout(10);
        options.setKeepAliveInterval(s.keepAliveS());
        options.setMaxInflight(MAX_INFLIGHT);
        if (s.username() != null) options.setUserName(s.username());
        if (s.password() != null) options.setPassword(s.password());
        if (willTopic != null) options.setWill(willTopic, willPayload, 1, true);
        if (s.broker().startsWith("ssl://")) {
            SSLContext ctx = TlsFiles.context(s.caFile(), s.certFile(), s.keyFile());
            options.setSocketFactory(NoDelaySockets.tls(ctx.getSocketFactory()));
        } else {
            options.setSocketFactory(NoDelaySockets.plain());
        }
        org.eclipse.paho.client.mqttv3.DisconnectedBufferOptions buffer = new org.eclipse.paho.client.mqttv3.DisconnectedBufferOptions();
        buffer.setBufferEnabled(true);
        buffer.setBufferSize(OFFLINE_BUFFER);
        buffer.setPersistBuffer(false);
        buffer.setDeleteOldestMessages(false);
        client.setBufferOpts(buffer);
        redial = java.util.concurrent.Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "mqtt-redial");
            t.setDaemon(true);
            return t;
        });
        client.setCallback(new MqttCallbackExtended() {
            @Override
            public void connectComplete(boolean reconnect, String uri) {
                LOG.info("{} to {}", reconnect ? "reconnected" : "connected", uri);
                subscribe();
                onConnect.run();
            }

            @Override
            public void connectionLost(Throwable cause) {
                LOG.warn("broker connection lost: {}", cause.toString());
                if (!closing) redial.schedule(MqttLink.this::redial, RECONNECT_EVERY_MS, java.util.concurrent.TimeUnit.MILLISECONDS);
            }

            @Override
            public void messageArrived(String topic, MqttMessage message) {
                try {
                    MqttLink.this.onMessage.accept(topic, message.getPayload());
                } catch (RuntimeException e) {
                    LOG.error("message handler failed on {}", topic, e);
                }
            }

            @Override
            public void deliveryComplete(IMqttDeliveryToken token) {
                synchronized (window) {
                    window.notifyAll();
                }
            }
        });
    }

    /** Runs on Paho's thread after each (re)connect, after the subscriptions were requested. Must not block. */
    public void onConnect(Runnable r) { this.onConnect = r; }

    private void subscribe() {
        if (subscriptions.isEmpty()) return;
        try {
            String[] topics = subscriptions.toArray(new String[0]);
            int[] qos = new int[topics.length];
            java.util.Arrays.fill(qos, 1);
            client.subscribe(topics, qos); // asynchronous: never wait inside the callback
        } catch (MqttException e) {
            LOG.error("subscribe failed: {}", e.toString());
        }
    }

    /** Connects, waiting up to the timeout for the first connection. */
    public void connect(long timeoutMs) throws MqttException {
        IMqttToken t = client.connect(options);
        t.waitForCompletion(timeoutMs);
    }

    public boolean isConnected() { return client.isConnected(); }

    /** Tries to reconnect now and again every {@value #RECONNECT_EVERY_MS} ms until connected or closed. */
    private void redial() {
        if (closing || client.isConnected()) return;
        try {
            client.reconnect();
        } catch (MqttException e) {
            LOG.debug("reconnect: {}", e.toString()); // already connecting, or the broker is not back yet
        }
        redial.schedule(this::redial, RECONNECT_EVERY_MS, java.util.concurrent.TimeUnit.MILLISECONDS);
    }

    @Override
    public void publish(String topic, byte[] payload, int qos, boolean retained) {
        boolean told = false;
        while (true) {
            try {
                client.publish(topic, payload, qos, retained);
                return;
            } catch (MqttException e) {
                // Every refusal of the client here is passing: a full window or offline buffer, or a connection on its
                // way down or back up (not connected, connecting, disconnecting, lost). Wait and hand it over again;
                // only a link that is being closed gives up.
                if (closing) {
                    LOG.warn("publish to {} not delivered: closing ({})", topic, e.toString());
                    notOffered.incrementAndGet();
                    return;
                }
                if (!told && e.getReasonCode() != MqttException.REASON_CODE_MAX_INFLIGHT) {
                    LOG.debug("publish to {} waits: {}", topic, e.toString());
                    told = true;
                }
                waits.incrementAndGet();
                synchronized (window) {
                    try {
                        window.wait(20);
                    } catch (InterruptedException ie) {
                        Thread.currentThread().interrupt();
                        notOffered.incrementAndGet();
                        return;
                    }
                }
            }
        }
    }

    @Override
    public boolean offer(String topic, byte[] payload, int qos, boolean retained) {
        try {
            client.publish(topic, payload, qos, retained);
            return true;
        } catch (MqttException e) {
            notOffered.incrementAndGet();
            LOG.warn("publish to {} not possible now: {}", topic, e.toString());
            return false;
        }
    }

    public void publish(String topic, String payload, int qos, boolean retained) {
        publish(topic, payload.getBytes(StandardCharsets.UTF_8), qos, retained);
    }

    /** Times a publish had to wait for the in-flight window or the offline buffer. */
    public long waits() { return waits.get(); }

    /** Messages that could not be handed to the client (only when closing, or offered from its own thread). */
    public long notOffered() { return notOffered.get(); }

    /** Messages held for the broker's return. */
    public int buffered() { return client.getBufferedMessageCount(); }

    /** Publishes and waits until the broker acknowledged it (used for the final offline state). */
    public void publishAndWait(String topic, byte[] payload, int qos, boolean retained, long timeoutMs) {
        try {
            client.publish(topic, payload, qos, retained).waitForCompletion(timeoutMs);
        } catch (MqttException e) {
            LOG.warn("publish to {} failed: {}", topic, e.toString());
        }
    }

    @Override
    public void close() {
        closing = true;
        redial.shutdownNow();
        try {
            if (client.isConnected()) client.disconnect(2000).waitForCompletion(3000);
        } catch (MqttException e) {
            LOG.debug("disconnect: {}", e.toString());
        }
        try {
            client.close(true);
        } catch (MqttException e) {
            LOG.debug("close: {}", e.toString());
        }
    }
}
