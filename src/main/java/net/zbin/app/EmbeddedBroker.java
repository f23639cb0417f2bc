package net.zbin.app;

import io.moquette.broker.Server;
import io.moquette.broker.config.MemoryConfig;
import java.io.IOException;
import java.nio.file.Path;
import java.util.Properties;

/**
 * Moquette 0.17 in this process, for the demo and tests: loopback only, a free port, no
 * persistence, no telemetry, messages up to 64 KiB (so an oversized trigger reaches zbin and is
 * rejected there, instead of being dropped by the broker). A {@link SessionLoopKeeper} starts again any of Moquette's
 * session loops that a failing command ended, so one broker fault does not silence a line for the rest of the run.
 */
public final class EmbeddedBroker implements AutoCloseable {
    private static final long LISTEN_WAIT_NS = 60_000_000_000L; // generous: on a loaded machine the listener has taken over 10 s

    private final Server server;
    private final int port;
    private final SessionLoopKeeper keeper;

    /**
     * Starts on a free port chosen here (not Moquette's port 0, whose bound port it reports asynchronously through a
     * map that another thread fills: under load that read stayed 0 for a minute) and returns once an MQTT client can connect to
     * it. A port taken by someone else in between is tried again on another, up to three times.
     */
    public EmbeddedBroker(Path dataDir) throws IOException {
        IOException last = null;
        for (int attempt = 0; attempt < 3; attempt++) {
            int candidate = freePort();
            Server s = new Server();
            SessionLoopKeeper k = new SessionLoopKeeper();
            try {
                s.startServer(new MemoryConfig(properties(dataDir, candidate)), java.util.List.of(k));
            } catch (IOException | RuntimeException e) {
                last = new IOException("embedded broker did not start on port " + candidate + ": " + e, e);
                stopQuietly(s);
                continue;
            }
            k.watch(s);
            if (listening(candidate)) {
                server = s;
                port = candidate;
                keeper = k;
                return;
            }
            k.close();
            stopQuietly(s);
            last = new IOException("embedded broker did not listen on port " + candidate + " within 60 s");
        }
        throw last;
    }

    private static Properties properties(Path dataDir, int port) {
        Properties p = new Properties();
        p.setProperty("host", "127.0.0.1");
        p.setProperty("port", Integer.toString(port));
        p.setProperty("websocket_port", "disabled");
        p.setProperty("persistence_enabled", "false");
        p.setProperty("telemetry_enabled", "false");
        p.setProperty("allow_anonymous", "true");
        p.setProperty("data_path", dataDir.toString());
        p.setProperty("netty.mqtt.message_size", "65536");
        p.setProperty("netty.tcp_nodelay", "true");
        p.setProperty("immediate_buffer_flush", "true");
        // MQTT 3.1.1 lets a clean-session client send an empty id (mosquitto_pub/sub do).
        p.setProperty("allow_zero_byte_client_id", "true");
        return p;
    }

    private static int freePort() throws IOException {
        try (java.net.ServerSocket s = new java.net.ServerSocket(0, 1, java.net.InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    /**
     * Whether an MQTT client can connect within the bound (polling every 20 ms): a whole CONNECT/CONNACK and a clean
     * DISCONNECT, so the broker sees a proper session, not a bare TCP probe.
     */
    private static boolean listening(int port) throws IOException {
        long end = System.nanoTime() + LISTEN_WAIT_NS;
        String url = "tcp://127.0.0.1:" + port;
        while (System.nanoTime() < end) {
            try {
                org.eclipse.paho.client.mqttv3.MqttClient c = new org.eclipse.paho.client.mqttv3.MqttClient(url, "zbin-embedded-probe-" + System.nanoTime(),
                        new org.eclipse.paho.client.mqttv3.persist.MemoryPersistence());
                org.eclipse.paho.client.mqttv3.MqttConnectOptions o = new org.eclipse.paho.client.mqttv3.MqttConnectOptions();
                o.setCleanSession(true);
                o.setConnectionTimeout(5);
                try {
                    c.connect(o);
                    c.disconnect();
                    return true;
                } finally {
                    c.close();
                }
            } catch (org.eclipse.paho.client.mqttv3.MqttException notYet) {
                try {
                    Thread.sleep(20);
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    throw new IOException("interrupted while the broker started", e);
                }
            }
        }
        return false;
    }

    private static void stopQuietly(Server s) {
        try {
            s.stopServer();
        } catch (RuntimeException ignored) {
            // it did not start: nothing to stop
        }
    }

    public int port() { return port; }

    /** The Moquette server itself, for tests that reach into it. */
    Server server() { return server; }

    public String url() { return "tcp://127.0.0.1:" + port(); }

    /** Moquette session loops started again after one ended (see {@link SessionLoopKeeper}). */
    public long sessionLoopsRevived() { return keeper.revived(); }

    /** Stops the loop keeper first: the loops Moquette ends at its stop must stay ended. */
    @Override
    public void close() {
        keeper.close();
        server.stopServer();
    }
}
