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
 * in the working folder), in-flight window well above the default 10, automatic reconnect with a
 * short maximum delay, resubscribe on every connect without blocking the callback thread, a
 * retained Will, TCP_NODELAY sockets. {@code messageArrived} only hands the message on.
 */
public final class MqttLink implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(MqttLink.class);
    public static final int MAX_INFLIGHT = 1000;

    private final MqttAsyncClient client;
    private final MqttConnectOptions options;
    private final List<String> subscriptions;
    private final BiConsumer<String, byte[]> onMessage;
    private volatile Runnable onConnect = () -> { };

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
        options.setMaxReconnectDelay(2000);
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
        client.setCallback(new MqttCallbackExtended() {
            @Override
            public void connectComplete(boolean reconnect, String uri) {
                LOG.info("{} to {}", reconnect ? "reconnected" : "connected", uri);
                subscribe();
                onConnect.run();
            }

            @Override
            public void connectionLost(Throwable cause) { LOG.warn("broker connection lost: {}", cause.toString()); }

            @Override
            public void messageArrived(String topic, MqttMessage message) {
                try {
                    MqttLink.this.onMessage.accept(topic, message.getPayload());
                } catch (RuntimeException e) {
                    LOG.error("message handler failed on {}", topic, e);
                }
            }

            @Override
            public void deliveryComplete(IMqttDeliveryToken token) { }
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

    /** Publishes without waiting for the broker's acknowledgement. */
    public void publish(String topic, byte[] payload, int qos, boolean retained) {
        try {
            client.publish(topic, payload, qos, retained);
        } catch (MqttException e) {
            LOG.warn("publish to {} failed: {}", topic, e.toString());
        }
    }

    public void publish(String topic, String payload, int qos, boolean retained) {
        publish(topic, payload.getBytes(StandardCharsets.UTF_8), qos, retained);
    }

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
