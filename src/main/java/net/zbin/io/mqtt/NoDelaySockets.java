package net.zbin.io.mqtt;

import java.io.IOException;
import java.net.InetAddress;
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

    /** Plain TCP. */
    public static SocketFactory plain() {
        SocketFactory base = SocketFactory.getDefault();
        return new SocketFactory() {
            @Override public Socket createSocket() throws IOException { return nodelay(base.createSocket()); }
            @Override public Socket createSocket(String h, int p) throws IOException { return nodelay(base.createSocket(h, p)); }
            @Override public Socket createSocket(String h, int p, InetAddress la, int lp) throws IOException { return nodelay(base.createSocket(h, p, la, lp)); }
            @Override public Socket createSocket(InetAddress a, int p) throws IOException { return nodelay(base.createSocket(a, p)); }
            @Override public Socket createSocket(InetAddress a, int p, InetAddress la, int lp) throws IOException { return nodelay(base.createSocket(a, p, la, lp)); }
        };
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
