package net.zbin.io.mqtt;

import java.nio.charset.StandardCharsets;
import java.util.ArrayDeque;
import java.util.List;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.BiConsumer;
import javax.net.ssl.SSLContext;
import net.zbin.io.LineConfig;
import org.eclipse.paho.client.mqttv3.IMqttActionListener;
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
 * passes the message to the handler, and acknowledges it to the broker when the handler returns unless the handler held the
 * acknowledgement ({@link Ack}: the daemon holds a trigger's until its decision is out).
 *
 * <p>Session policy: a clean session under a client id that is stable per line. Nothing is queued for
 * zbin at the broker while it is away, so no trigger sent before a reconnect is delivered afterwards,
 * when its part may have moved; the handler's retry is the trigger that counts, and it is answered
 * from the decision book if it was decided, or measured now (the part is still on the contacts, the
 * handler is waiting for it). No decision is discarded: a full in-flight window makes the publisher
 * wait, and while the broker is away publishes go to a bounded outbox of this link that is delivered,
 * in order, on reconnect (a full outbox makes the publisher wait too).
 *
 * <p>This link, not Paho, reconnects and buffers. Paho's own offline buffer can strand messages after a
 * reconnect (a message that arrives while the buffer is being emptied stays in it, and every later
 * message, subscriptions included, queues behind it while the client reports itself connected), and
 * Paho's automatic reconnect retries once a second, and a faster dialler beside it can start two connects at
 * once (its connect checks the state and acts on it without a lock). So one thread here looks every
 * {@value #RECONNECT_EVERY_MS} ms and dials when the client is not connected, whether or not a loss was
 * reported, and the line is subscribed again a fraction of a second after the broker returns.
 */
public final class MqttLink implements Publisher, AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(MqttLink.class);
    public static final int MAX_INFLIGHT = 1000;
    /** Messages held while the broker is away. */
    public static final int OFFLINE_BUFFER = 50_000;
    static final long RECONNECT_EVERY_MS = 100;

    private record Out(String topic, byte[] payload, int qos, boolean retained) { }

    private final MqttAsyncClient client;
    private final MqttConnectOptions options;
    private final List<String> subscriptions;
    private final Inbound onMessage;
    private volatile Runnable onConnect = () -> { };
    /** Guards {@link #outbox} and {@link #windowWaiters}; notified when the window frees, the outbox changes or the link connects. */
    private final Object window = new Object();
    /**
     * Threads waiting for the in-flight window to free (a publisher, or the outbox thread after a refused publish). The
     * broker's acknowledgement of each message wakes them only while there are any: waking the idle outbox thread on
     * every acknowledgement cost a thread switch per decision.
     */
    private int windowWaiters;
    /** Wake-ups of the idle outbox thread (guarded by {@link #window}): it should turn when there is something to send, not per message sent. */
    private long flusherTurns;
    private final ArrayDeque<Out> outbox = new ArrayDeque<>();
    private final ScheduledExecutorService redial;
    private final Thread flusher;
    private final AtomicLong waits = new AtomicLong();
    private final AtomicLong notOffered = new AtomicLong();
    private volatile boolean closing;
    private volatile boolean everConnected;

    /** Paho's threads, started without its 100 ms sleeps (see {@link PromptStarts}). */
    final PromptStarts threads;

    /**
     * Receives a message on Paho's callback thread; may {@link Ack#hold hold} its acknowledgement. It may do a bounded piece
     * of work there (the daemon measures a part on an idle line), but never wait on this link: while it runs, the
     * acknowledgements that free the window are read only until ten messages wait behind it ({@link #hasRoom} first).
     */
    @FunctionalInterface
    public interface Inbound {
        void arrived(String topic, byte[] payload, Ack ack);
    }

    /**
     * @param onMessage receives (topic, payload) on Paho's thread: must not block; each message is acknowledged to the
     *                  broker when it returns
     */
    public MqttLink(LineConfig.MqttSettings s, String willTopic, byte[] willPayload, List<String> subscriptions,
                    BiConsumer<String, byte[]> onMessage) throws Exception {
        this(s, willTopic, willPayload, subscriptions, (Inbound) (t, p, a) -> onMessage.accept(t, p));
    }

    public MqttLink(LineConfig.MqttSettings s, String willTopic, byte[] willPayload, List<String> subscriptions,
                    Inbound onMessage) throws Exception {
        this.subscriptions = List.copyOf(subscriptions);
        this.onMessage = onMessage;
        this.threads = new PromptStarts("mqtt-" + s.clientId());
        this.client = new MqttAsyncClient(s.broker(), s.clientId(), new MemoryPersistence(), new org.eclipse.paho.client.mqttv3.TimerPingSender(),
                threads);
        client.setManualAcks(true); // this link acknowledges, see Ack
        options = new MqttConnectOptions();
        options.setMqttVersion(MqttConnectOptions.MQTT_VERSION_3_1_1);
        options.setCleanSession(true);
        options.setAutomaticReconnect(false); // this link redials, see the class comment
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
        redial = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "mqtt-redial");
            t.setDaemon(true);
            return t;
        });
        flusher = new Thread(this::flushOutbox, "mqtt-outbox");
        flusher.setDaemon(true);
        client.setCallback(new MqttCallbackExtended() {
            @Override
            public void connectComplete(boolean reconnect, String uri) {
                LOG.info("{} to {}", everConnected ? "reconnected" : "connected", uri);
                everConnected = true;
                synchronized (subscribing) {
                    connections++;
                }
                if (!subscribe()) onConnect.run();
                wake();
            }

            @Override
            public void connectionLost(Throwable cause) {
                LOG.warn("broker connection lost: {}", cause.toString()); // the redial thread notices it too
            }

            @Override
            public void messageArrived(String topic, MqttMessage message) {
                Ack ack = new Ack(MqttLink.this, message.getId(), message.getQos(), connection());
                try {
                    MqttLink.this.onMessage.arrived(topic, message.getPayload(), ack);
                } catch (RuntimeException e) {
                    LOG.error("message handler failed on {}", topic, e);
                } finally {
                    if (!ack.held()) ack.send();
                }
            }

            @Override
            public void deliveryComplete(IMqttDeliveryToken token) {
                synchronized (window) {
                    if (windowWaiters > 0) window.notifyAll();
                }
            }
        });
    }

    private void wake() {
        synchronized (window) {
            window.notifyAll();
        }
    }

    /**
     * Runs on Paho's thread after each (re)connect once the broker acknowledged the subscriptions on that connection
     * (at once when there are none): from then on what another client publishes to them is heard. Must not block.
     */
    public void onConnect(Runnable r) { this.onConnect = r; }

    /** Guards {@link #hearing}, {@link #connections} and {@link #requestedOn}: one request of the subscriptions per connection. */
    private final Object subscribing = new Object();
    /** False while {@link #holdSubscriptions} holds them back. */
    private boolean hearing = true;
    /** Connections made so far (counted as each completes), and the one the subscriptions were last requested on. */
    private long connections, requestedOn;

    /**
     * Connects without subscribing until {@link #hear}: the connect can start before the owner is ready to take
     * messages (a Paho connect waits some 0.3 s on its own threads starting, which then passes under other work).
     * Call before {@link #connectStart}.
     */
    public void holdSubscriptions() {
        synchronized (subscribing) {
            hearing = false;
        }
    }

    /** Requests the subscriptions held back, on the present connection if there is one, and on every one after. */
    public void hear() {
        boolean now;
        synchronized (subscribing) {
            hearing = true;
            now = connections > 0;
        }
        if (now) subscribe();
    }

    /** Requests the subscriptions (once per connection); false when there are none to request. */
    private boolean subscribe() {
        if (subscriptions.isEmpty()) return false;
        synchronized (subscribing) {
            if (!hearing || requestedOn == connections) return true; // held (hear() asks), or asked on this connection already
            requestedOn = connections;
        }
        try {
            String[] topics = subscriptions.toArray(new String[0]);
            int[] qos = new int[topics.length];
            java.util.Arrays.fill(qos, 1);
            // asynchronous: never wait inside the callback; the broker's acknowledgement is heard by the listener
            client.subscribe(topics, qos, null, new IMqttActionListener() {
                @Override
                public void onSuccess(IMqttToken t) {
                    onConnect.run();
                    subscribed.complete(null);
                }

                @Override
                public void onFailure(IMqttToken t, Throwable e) {
                    LOG.debug("subscribe not acknowledged: {}", String.valueOf(e)); // the connection went: the next one subscribes again
                }
            });
        } catch (MqttException e) {
            LOG.error("subscribe failed: {}", e.toString());
        }
        return true;
    }

    /** Completed by the first acknowledged subscription, on whichever connection it came. */
    private final java.util.concurrent.CompletableFuture<Void> subscribed = new java.util.concurrent.CompletableFuture<>();

    /**
     * Waits, up to the timeout, until the broker acknowledged the line's subscriptions on some connection: from then
     * on a message published to them by any client is delivered here. A broker may drop a connection that subscribes
     * the moment it is accepted (the embedded Moquette does, on a loaded machine: "SUBSCRIBE received on already closed
     * connection"); the link then dials again and subscribes again, and this waits for that. False (and logged) when
     * no acknowledgement came in time: the link goes on as before, the caller decides.
     */
    public boolean awaitSubscribed(long timeoutMs) {
        if (subscriptions.isEmpty()) return true;
        try {
            subscribed.get(timeoutMs, TimeUnit.MILLISECONDS);
            return true;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return false;
        } catch (java.util.concurrent.TimeoutException | java.util.concurrent.ExecutionException e) {
            LOG.warn("subscriptions not acknowledged by the broker within {} ms", timeoutMs);
            return false;
        }
    }

    /**
     * Subscribes to more topics on the present connection only (not again after a reconnect; the broker drops them with
     * the connection), waiting up to the timeout for the broker's acknowledgement; false when it did not come or was
     * refused. For the start's rehearsal.
     */
    public boolean subscribeHere(List<String> topics, long timeoutMs) {
        int[] qos = new int[topics.size()];
        java.util.Arrays.fill(qos, 1);
        try {
            IMqttToken t = client.subscribe(topics.toArray(new String[0]), qos);
            t.waitForCompletion(timeoutMs);
            int[] granted = t.getGrantedQos();
            return granted != null && java.util.Arrays.stream(granted).allMatch(g -> g >= 0 && g <= 2);
        } catch (MqttException e) {
            LOG.debug("subscribe to {} not acknowledged: {}", topics, e.toString());
            return false;
        }
    }

    /** The connection count now (a message is acknowledged only on the connection it came on). */
    private long connection() {
        synchronized (subscribing) {
            return connections;
        }
    }

    /** Counted acknowledgements sent, and those dropped because their connection had gone. */
    private final AtomicLong acks = new AtomicLong(), staleAcks = new AtomicLong();

    /** {@link Ack#send}: the broker's acknowledgement of message {@code id}, on its own connection only. */
    void acknowledge(int id, int qos, long onConnection) {
        if (qos == 0) return;
        if (connection() != onConnection) {
            staleAcks.incrementAndGet();
            return;
        }
        try {
            client.messageArrivedComplete(id, qos);
            acks.incrementAndGet();
        } catch (MqttException | RuntimeException e) {
            LOG.debug("acknowledgement of message {} not sent: {}", id, e.toString()); // the connection went: the broker forgets it
        }
    }

    /** QoS 1 acknowledgements handed to the client so far. */
    public long acksSent() { return acks.get(); }

    /** Acknowledgements not sent because their message's connection had gone by then. */
    public long acksStale() { return staleAcks.get(); }

    /** Connects, waiting up to the timeout for the first connection. */
    public void connect(long timeoutMs) throws MqttException { connected(connectStart(), timeoutMs); }

    /** Starts the first connect without waiting: other start-up work can run while it completes. */
    public IMqttToken connectStart() throws MqttException { return client.connect(options); }

    /** Waits for the connect {@link #connectStart} began, then starts the outbox and the redial thread. */
    public void connected(IMqttToken t, long timeoutMs) throws MqttException {
        t.waitForCompletion(timeoutMs);
        if (!flusher.isAlive()) {
            flusher.start();
            redial.scheduleWithFixedDelay(net.zbin.io.FatalErrors.surfaced(this::redial), RECONNECT_EVERY_MS, RECONNECT_EVERY_MS, TimeUnit.MILLISECONDS);
        }
    }

    public boolean isConnected() { return client.isConnected(); }

    /** The only place that reconnects, every {@value #RECONNECT_EVERY_MS} ms while not connected. Never throws (that would end it). */
    private void redial() {
        if (closing || client.isConnected()) return;
        try {
            client.connect(options);
        } catch (MqttException e) {
            LOG.debug("reconnect: {}", e.toString()); // still connecting, or the broker is not back yet
        } catch (RuntimeException e) {
            LOG.warn("reconnect failed: {}", e.toString());
        }
    }

    @Override
    public void publish(String topic, byte[] payload, int qos, boolean retained) {
        Out m = new Out(topic, payload, qos, retained);
        while (true) {
            synchronized (window) {
                if (closing) {
                    LOG.warn("publish to {} not delivered: closing", topic);
                    notOffered.incrementAndGet();
                    return;
                }
                if (!outbox.isEmpty() || !client.isConnected()) {
                    // away, or still delivering what was held while away: queue behind it, in order
                    if (outbox.size() < OFFLINE_BUFFER) {
                        outbox.addLast(m);
                        window.notifyAll();
                        return;
                    }
                    if (!await(20)) return;
                    continue;
                }
            }
            try {
                client.publish(topic, payload, qos, retained);
                return;
            } catch (MqttException e) {
                // A full window waits for acknowledgements; a connection on its way down makes the next turn queue it.
                if (e.getReasonCode() != MqttException.REASON_CODE_MAX_INFLIGHT) LOG.debug("publish to {} waits: {}", topic, e.toString());
                if (!await(20)) return;
            }
        }
    }

    /** Waits for the window or the outbox to move; false (and counted) when the publishing thread was interrupted. */
    private boolean await(long ms) {
        waits.incrementAndGet();
        synchronized (window) {
            windowWaiters++;
            try {
                window.wait(ms);
                return true;
            } catch (InterruptedException ie) {
                Thread.currentThread().interrupt();
                notOffered.incrementAndGet();
                return false;
            } finally {
                windowWaiters--;
            }
        }
    }

    /** Hands what was held while the broker was away to the client, oldest first, once connected. */
    private void flushOutbox() {
        while (!closing) {
            Out m;
            synchronized (window) {
                try {
                    while (!closing && (outbox.isEmpty() || !client.isConnected())) {
                        window.wait(100);
                        flusherTurns++;
                    }
                } catch (InterruptedException e) {
                    return;
                }
                if (closing) return;
                m = outbox.peekFirst();
            }
            try {
                client.publish(m.topic(), m.payload(), m.qos(), m.retained());
                synchronized (window) {
                    outbox.pollFirst();
                    window.notifyAll();
                }
            } catch (MqttException e) {
                synchronized (window) {
                    windowWaiters++;
                    try {
                        window.wait(20); // a full window, or the connection went again
                    } catch (InterruptedException ie) {
                        return;
                    } finally {
                        windowWaiters--;
                    }
                }
            }
        }
    }

    public void publish(String topic, String payload, int qos, boolean retained) {
        publish(topic, payload.getBytes(StandardCharsets.UTF_8), qos, retained);
    }

    /** Times a publish had to wait for the in-flight window or the offline buffer. */
    public long waits() { return waits.get(); }

    /** Messages that could not be handed to the client (only when closing, or when the publisher was interrupted). */
    public long notOffered() { return notOffered.get(); }

    /** How often the outbox thread woke to look at the outbox. */
    long flusherTurns() {
        synchronized (window) {
            return flusherTurns;
        }
    }

    /**
     * Whether a publish now goes straight to the client without waiting: connected, nothing held back in the outbox,
     * the in-flight window at most half full. Cheap: asked before each message that may run on Paho's own thread.
     */
    public boolean hasRoom() {
        synchronized (window) {
            if (!outbox.isEmpty()) return false;
        }
        return client.isConnected() && client.getInFlightMessageCount() < MAX_INFLIGHT / 2;
    }

    /** Messages held for the broker's return. */
    public int buffered() {
        synchronized (window) {
            return outbox.size();
        }
    }

    /**
     * Lets what is held go out first, then publishes and waits until the broker acknowledged it (the final
     * dashboard and offline state of a clean stop).
     */
    public void publishAndWait(String topic, byte[] payload, int qos, boolean retained, long timeoutMs) {
        long end = System.nanoTime() + TimeUnit.MILLISECONDS.toNanos(timeoutMs);
        try {
            synchronized (window) {
                while (!outbox.isEmpty() && client.isConnected() && System.nanoTime() < end) window.wait(20);
            }
            long left = Math.max(1, TimeUnit.NANOSECONDS.toMillis(end - System.nanoTime()));
            client.publish(topic, payload, qos, retained).waitForCompletion(left);
        } catch (MqttException e) {
            LOG.warn("publish to {} failed: {}", topic, e.toString());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    @Override
    public void close() {
        closing = true;
        redial.shutdownNow();
        wake();
        int left = buffered();
        if (left > 0) {
            LOG.warn("{} held messages not delivered: the broker is away at the stop", left);
            notOffered.addAndGet(left);
        }
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
