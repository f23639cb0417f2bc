package net.zbin.io.mqtt;

import java.io.BufferedInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.Socket;
import java.net.SocketAddress;
import java.net.SocketException;
import java.nio.channels.SocketChannel;

/**
 * The MQTT client's plain TCP socket: a blocking {@link SocketChannel} behind the {@link Socket} Paho asks for, read
 * through a buffer and without a read timeout.
 *
 * <p>Why: Paho sets a one-second read timeout so that its receiver can look up now and then, and the JDK's socket
 * serves a read with a timeout by switching the connection to non-blocking for good: every wait for the next message
 * is then a read that finds nothing, a poll, and the read again, and Paho asks {@code available()} (one more system call)
 * before each message. A blocking channel read without a timeout is one system call per wait. The receiver still ends
 * when the broker goes silent: Paho's keep-alive gives up on the connection, interrupts the receiver's thread (which closes
 * a channel that thread is blocked on) and closes the socket (which ends the read in any case).
 *
 * <p>Only what Paho and this package use is carried over to the channel; {@link #getSoTimeout()} reports what was set
 * (kept, not applied). {@code available()} counts the bytes already buffered: Paho only keeps it in a flag nothing reads.
 */
final class ChannelSocket extends Socket {
    private final SocketChannel ch;
    private final Socket a;
    private volatile int soTimeoutMs;
    private InputStream in;

    ChannelSocket() throws IOException {
        ch = SocketChannel.open();
        a = ch.socket();
    }

    @Override public void connect(SocketAddress to) throws IOException { a.connect(to); }

    /** A connect with a timeout leaves the channel blocking (the JDK's socket would stay non-blocking afterwards). */
    @Override public void connect(SocketAddress to, int timeoutMs) throws IOException { a.connect(to, timeoutMs); }

    @Override public void bind(SocketAddress from) throws IOException { a.bind(from); }

    @Override
    public synchronized InputStream getInputStream() throws IOException {
        if (in == null) {
            in = new BufferedInputStream(a.getInputStream(), 16 * 1024) {
                @Override
                public synchronized int available() { return count - pos; }
            };
        }
        return in;
    }

    @Override public OutputStream getOutputStream() throws IOException { return a.getOutputStream(); }

    @Override public void close() throws IOException { ch.close(); }

    @Override public SocketChannel getChannel() { return ch; }

    @Override public void setSoTimeout(int timeoutMs) throws SocketException {
        if (timeoutMs < 0) throw new IllegalArgumentException("timeout < 0");
        soTimeoutMs = timeoutMs;
    }

    @Override public int getSoTimeout() { return soTimeoutMs; }

    @Override public void setTcpNoDelay(boolean on) throws SocketException { a.setTcpNoDelay(on); }

    @Override public boolean getTcpNoDelay() throws SocketException { return a.getTcpNoDelay(); }

    @Override public void setKeepAlive(boolean on) throws SocketException { a.setKeepAlive(on); }

    @Override public boolean getKeepAlive() throws SocketException { return a.getKeepAlive(); }

    @Override public void setSoLinger(boolean on, int linger) throws SocketException { a.setSoLinger(on, linger); }

    @Override public int getSoLinger() throws SocketException { return a.getSoLinger(); }

    @Override public void setReceiveBufferSize(int size) throws SocketException { a.setReceiveBufferSize(size); }

    @Override public int getReceiveBufferSize() throws SocketException { return a.getReceiveBufferSize(); }

    @Override public void setSendBufferSize(int size) throws SocketException { a.setSendBufferSize(size); }

    @Override public int getSendBufferSize() throws SocketException { return a.getSendBufferSize(); }

    @Override public void shutdownInput() throws IOException { a.shutdownInput(); }

    @Override public void shutdownOutput() throws IOException { a.shutdownOutput(); }

    @Override public boolean isConnected() { return a.isConnected(); }

    @Override public boolean isBound() { return a.isBound(); }

    @Override public boolean isClosed() { return a.isClosed(); }

    @Override public boolean isInputShutdown() { return a.isInputShutdown(); }

    @Override public boolean isOutputShutdown() { return a.isOutputShutdown(); }

    @Override public InetAddress getInetAddress() { return a.getInetAddress(); }

    @Override public InetAddress getLocalAddress() { return a.getLocalAddress(); }

    @Override public int getPort() { return a.getPort(); }

    @Override public int getLocalPort() { return a.getLocalPort(); }

    @Override public SocketAddress getRemoteSocketAddress() { return a.getRemoteSocketAddress(); }

    @Override public SocketAddress getLocalSocketAddress() { return a.getLocalSocketAddress(); }

    @Override public String toString() { return "ChannelSocket[" + a + "]"; }
}
