package net.zbin.app;

import io.moquette.broker.Server;
import io.moquette.broker.config.MemoryConfig;
import java.io.IOException;
import java.nio.file.Path;
import java.util.Properties;

/**
 * Moquette 0.17 in this process, for the demo and tests: loopback only, a free port, no
 * persistence, no telemetry, messages up to 64 KiB (so an oversized trigger reaches zbin and is
 * rejected there, instead of being dropped by the broker).
 */
public final class EmbeddedBroker implements AutoCloseable {
    private final Server server = new Server();

    public EmbeddedBroker(Path dataDir) throws IOException {
        Properties p = new Properties();
        p.setProperty("host", "127.0.0.1");
        p.setProperty("port", "0");
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
        server.startServer(new MemoryConfig(p));
        port = boundPort();
    }

    private final int port;

    /**
     * Moquette binds asynchronously: getPort() is 0 until the listener is up, and while its acceptor
     * registers the listener it may throw ConcurrentModificationException (read again).
     */
    private int currentPort() {
        try {
            return server.getPort();
        } catch (java.util.ConcurrentModificationException e) {
            return 0;
        }
    }

    private int boundPort() throws IOException {
        long end = System.nanoTime() + 60_000_000_000L; // generous: on a loaded machine the listener has taken over 10 s
        int bound;
        while ((bound = currentPort()) == 0) {
            if (System.nanoTime() > end) {
                server.stopServer();
                throw new IOException("embedded broker did not bind a port within 60 s");
            }
            try {
                Thread.sleep(5);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                throw new IOException("interrupted while the broker started", e);
            }
        }
        return bound;
    }

    public int port() { return port; }

    public String url() { return "tcp://127.0.0.1:" + port(); }

    @Override
    public void close() { server.stopServer(); }
}
