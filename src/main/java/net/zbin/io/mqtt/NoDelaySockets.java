package net.zbin.io.mqtt;

import java.io.IOException;
import java.net.InetAddress;
import java.net.InetSocketAddress;
import java.net.Socket;
import javax.net.SocketFactory;
import javax.net.ssl.SSLSocketFactory;

/**
 * Socket factories that switch Nagle's algorithm off. Small QoS 1 messages otherwise wait on
 * delayed ACKs: tens of milliseconds per trigger→decision round trip instead of a fraction of one.
 */
public final class NoDelaySockets {
    private NoDelaySockets() {}

    static Socket nodelay(Socket s) throws IOException {
        s.setTcpNoDelay(true);
        return s;
    }

    /**
     * Plain TCP, read through a buffer: Paho reads a packet's fixed header a byte at a time from the socket's own
     * stream (one system call per byte), so a buffer takes each packet — often several — in one read; and without a
     * read timeout, one system call per wait for the next message ({@link ChannelSocket}).
     */
    public static SocketFactory plain() {
        return new SocketFactory() {
            @Override public Socket createSocket() throws IOException { return nodelay(new ChannelSocket()); }
            @Override public Socket createSocket(String h, int p) throws IOException { return connected(new InetSocketAddress(h, p), null); }
            @Override public Socket createSocket(String h, int p, InetAddress la, int lp) throws IOException {
                return connected(new InetSocketAddress(h, p), new InetSocketAddress(la, lp));
            }
            @Override public Socket createSocket(InetAddress a, int p) throws IOException { return connected(new InetSocketAddress(a, p), null); }
            @Override public Socket createSocket(InetAddress a, int p, InetAddress la, int lp) throws IOException {
                return connected(new InetSocketAddress(a, p), new InetSocketAddress(la, lp));
            }
        };
    }

    private static Socket connected(InetSocketAddress to, InetSocketAddress from) throws IOException {
        Socket s = nodelay(new ChannelSocket());
        try {
            if (from != null) s.bind(from);
            s.connect(to);
            return s;
        } catch (IOException e) {
            s.close();
            throw e;
        }
    }

    /** TLS over a no-delay socket. */
    public static SSLSocketFactory tls(SSLSocketFactory base) {
        return new SSLSocketFactory() {
            @Override public String[] getDefaultCipherSuites() { return base.getDefaultCipherSuites(); }
            @Override public String[] getSupportedCipherSuites() { return base.getSupportedCipherSuites(); }
            @Override public Socket createSocket() throws IOException { return nodelay(base.createSocket()); }
            @Override public Socket createSocket(Socket s, String h, int p, boolean ac) throws IOException { s.setTcpNoDelay(true); return base.createSocket(s, h, p, ac); }
            @Override public Socket createSocket(String h, int p) throws IOException { return nodelay(base.createSocket(h, p)); }
            @Override public Socket createSocket(String h, int p, InetAddress la, int lp) throws IOException { return nodelay(base.createSocket(h, p, la, lp)); }
            @Override public Socket createSocket(InetAddress a, int p) throws IOException { return nodelay(base.createSocket(a, p)); }
            @Override public Socket createSocket(InetAddress a, int p, InetAddress la, int lp) throws IOException { return nodelay(base.createSocket(a, p, la, lp)); }
        };
    }
}
