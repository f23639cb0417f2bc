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
        server.startServer(new MemoryConfig(p));
    }

    public int port() { return server.getPort(); }

    public String url() { return "tcp://127.0.0.1:" + port(); }

    @Override
    public void close() { server.stopServer(); }
}
