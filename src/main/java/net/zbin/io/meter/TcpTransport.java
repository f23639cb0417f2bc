package net.zbin.io.meter;

import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.InetSocketAddress;
import java.net.Socket;
import java.net.SocketTimeoutException;

/** Raw TCP to a meter or a LAN-serial bridge. TCP_NODELAY is set: a query is a few bytes and must not wait. */
public final class TcpTransport implements Transport {
    private final String host;
    private final int port;
    private final int connectTimeoutMs;
    private Socket socket;
    private InputStream in;
    private OutputStream out;

    public TcpTransport(String host, int port, int connectTimeoutMs) {
        if (port <= 0 || port > 65535) throw new IllegalArgumentException("port must be 1..65535 (was " + port + ")");
        this.host = host;
        this.port = port;
        this.connectTimeoutMs = connectTimeoutMs;
    }

    @Override
    public void open() throws IOException {
        close();
        Socket s = new Socket();
        try {
            s.setTcpNoDelay(true);
            s.connect(new InetSocketAddress(host, port), connectTimeoutMs);
            in = s.getInputStream();
            out = s.getOutputStream();
            socket = s;
        } catch (IOException e) {
            s.close();
            throw e;
        }
    }

    @Override
    public boolean isOpen() { return socket != null && !socket.isClosed(); }

    @Override
    public void write(byte[] data) throws IOException {
        if (!isOpen()) throw new IOException("not connected");
        out.write(data);
        out.flush();
    }

    @Override
    public int read(byte[] buf, int timeoutMs) throws IOException {
        if (!isOpen()) throw new IOException("not connected");
        socket.setSoTimeout(Math.max(1, timeoutMs));
        try {
            return in.read(buf);
        } catch (SocketTimeoutException e) {
            return 0;
        }
    }

    @Override
    public int available() throws IOException {
        if (!isOpen()) throw new IOException("not connected");
        return in.available();
    }

    @Override
    public String describe() { return "tcp " + host + ":" + port; }

    @Override
    public void close() {
        if (socket != null) {
            try {
                socket.close();
            } catch (IOException ignored) {
                // closing: nothing left to do
            }
        }
        socket = null;
        in = null;
        out = null;
    }
}
