package net.zbin.io.mqtt;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import net.zbin.app.MosquittoProcess;
import net.zbin.io.LineConfig;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A broker that goes silent without closing the connection (a frozen process, a cable pulled between two switches):
 * played by a proxy in front of a real Mosquitto that stops carrying bytes on the connections it has while still
 * accepting new ones. The link's keep-alive notices, Paho ends its receiver (which waits on a read without a timeout:
 * the socket is closed under it) and the link dials again, subscribes again and hears.
 */
class MqttLinkSilentBrokerIT {
    @TempDir
    Path dir;

    /** Carries bytes both ways until {@link #silence}: from then the connections open so far swallow everything. */
    static final class SilentProxy implements AutoCloseable {
        final ServerSocket server = new ServerSocket(0, 8, InetAddress.getLoopbackAddress());
        final AtomicInteger connections = new AtomicInteger();
        private final int brokerPort;
        private volatile int silentUpTo;

        SilentProxy(int brokerPort) throws IOException {
            this.brokerPort = brokerPort;
            Thread t = new Thread(this::accept, "silent-proxy");
            t.setDaemon(true);
            t.start();
        }

        String url() { return "tcp://127.0.0.1:" + server.getLocalPort(); }

        /** The connections made so far carry nothing more (and are not closed). */
        void silence() { silentUpTo = connections.get(); }

        private void accept() {
            while (!server.isClosed()) {
                try {
                    Socket c = server.accept();
                    Socket b = new Socket(InetAddress.getLoopbackAddress(), brokerPort);
                    int n = connections.incrementAndGet();
                    pump(b.getInputStream(), c.getOutputStream(), n);
                    pump(c.getInputStream(), b.getOutputStream(), n);
                } catch (IOException e) {
                    return;
                }
            }
        }

        private void pump(InputStream in, OutputStream out, int connection) {
            Thread t = new Thread(() -> {
                byte[] buf = new byte[8192];
                try {
                    for (int k; (k = in.read(buf)) > 0; ) {
                        if (connection <= silentUpTo) continue; // swallowed
                        out.write(buf, 0, k);
                        out.flush();
                    }
                } catch (IOException ignored) {
                    // a side closed
                }
            }, "silent-proxy-pump");
            t.setDaemon(true);
            t.start();
        }

        @Override
        public void close() throws IOException { server.close(); }
    }

    @Test
    void aBrokerGoneSilent_isNoticedByTheKeepAlive_andTheLinkDialsAgainAndHears() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             SilentProxy proxy = new SilentProxy(broker.port)) {
            var heard = new LinkedBlockingQueue<String>();
            AtomicInteger subscribedOn = new AtomicInteger();
            // a keep-alive of 1 s: Paho pings after a quiet second and gives up about a second after that
            LineConfig.MqttSettings s = new LineConfig.MqttSettings(proxy.url(), "zbin", "silent-" + System.nanoTime(), null, null,
                    null, null, null, 1);
            try (MqttLink link = new MqttLink(s, null, null, List.of("line/trigger"), (t, p) -> heard.add(new String(p, StandardCharsets.UTF_8)))) {
                link.onConnect(subscribedOn::incrementAndGet);
                link.connect(10_000);
                assertTrue(link.awaitSubscribed(20_000));
                MqttLinkSubscribeIT.publishFromAnotherClient(broker.url(), "line/trigger", "before");
                assertEquals("before", heard.poll(20, TimeUnit.SECONDS));
                proxy.silence();
                MqttLinkOutboxIT.waitUntil(() -> subscribedOn.get() >= 2, 60_000, () -> "subscribed again on a new connection within 60 s"
                        + " of the broker going silent (connections through the proxy: " + proxy.connections.get() + ")");
                MqttLinkSubscribeIT.publishFromAnotherClient(broker.url(), "line/trigger", "after");
                String next;
                do next = heard.poll(20, TimeUnit.SECONDS); while ("before".equals(next));
                assertEquals("after", next, "heard on the new connection");
            }
        }
    }
}
