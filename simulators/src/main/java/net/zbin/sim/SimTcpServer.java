package net.zbin.sim;

import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;

/** Serves the simulated meter on a TCP port of the loopback interface, one thread per client. */
public final class SimTcpServer implements AutoCloseable {
    private final SimMeter meter;
    private final ServerSocket server;
    private final Thread acceptor;
    private final Set<Socket> clients = ConcurrentHashMap.newKeySet();
    private volatile boolean running = true;

    /** @param port TCP port, 0 for a free one */
    public SimTcpServer(SimMeter meter, int port) throws IOException {
        this.meter = meter;
        this.server = new ServerSocket(port, 16, InetAddress.getLoopbackAddress());
        this.acceptor = new Thread(this::acceptLoop, "sim-meter-accept");
        acceptor.setDaemon(true);
        acceptor.start();
    }

    public int port() { return server.getLocalPort(); }

    /** Connections open now. */
    public int clients() { return clients.size(); }

    private void acceptLoop() {
        while (running) {
            try {
                Socket s = server.accept();
                s.setTcpNoDelay(true);
                clients.add(s);
                Thread t = new Thread(() -> serve(s), "sim-meter-client");
                t.setDaemon(true);
                t.start();
            } catch (IOException e) {
                if (!running) return;
            }
        }
    }

    private void serve(Socket s) {
        LineServer lines = new LineServer(meter);
        byte[] buf = new byte[1024];
        try (s; InputStream in = s.getInputStream(); OutputStream out = s.getOutputStream()) {
            LineServer.Sink sink = new LineServer.Sink() {
                public void write(byte[] b) throws IOException { out.write(b); out.flush(); }

                public void disconnect() throws IOException { s.close(); }
            };
            int n;
            while (running && !s.isClosed() && (n = in.read(buf)) > 0) lines.feed(buf, n, sink);
        } catch (IOException e) {
            // client went away: nothing to do
        } finally {
            clients.remove(s);
        }
    }

    @Override
    public void close() {
        running = false;
        try {
            server.close();
        } catch (IOException ignored) {
            // closing
        }
        for (Socket s : clients) {
            try {
                s.close();
            } catch (IOException ignored) {
                // closing
            }
        }
        try {
            acceptor.join(2000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
