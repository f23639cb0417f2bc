package net.zbin.io.mqtt;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.DataInputStream;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.InetSocketAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;

/** The MQTT sockets: no Nagle delay, a buffered read that keeps a packet cut short, no read timeout, and a read an interrupt ends. */
class NoDelaySocketsTest {
    @Test
    void plainSocket_readsThroughOneBuffer_keepsAPacketCutShort_andIgnoresPahosReadTimeout() throws Exception {
        try (ServerSocket server = new ServerSocket(0, 1, InetAddress.getLoopbackAddress());
             Socket s = NoDelaySockets.plain().createSocket()) {
            s.connect(new InetSocketAddress(InetAddress.getLoopbackAddress(), server.getLocalPort()), 5000); // as Paho connects
            s.setSoTimeout(1000); // as Paho sets it: kept, not applied
            try (Socket peer = server.accept()) {
                assertTrue(s.getTcpNoDelay());
                assertEquals(1000, s.getSoTimeout());
                assertTrue(s.getChannel().isBlocking(), "a connect with a timeout left the connection blocking");
                assertSame(s.getInputStream(), s.getInputStream(), "one buffered stream per socket");
                assertEquals(0, s.getInputStream().available(), "nothing buffered yet (no system call asked)");
                DataInputStream in = new DataInputStream(s.getInputStream()); // read as Paho reads: a byte, then the rest
                OutputStream out = peer.getOutputStream();
                out.write(new byte[] {0x30, 3, 'a'}); // a packet cut short: its last bytes come later
                out.flush();
                assertTrue(in.readByte() == 0x30 && in.readByte() == 3);
                byte[] body = new byte[3];
                body[0] = in.readByte();
                CompletableFuture<byte[]> rest = CompletableFuture.supplyAsync(() -> {
                    try {
                        in.readFully(body, 1, 2);
                        byte[] ack = new byte[4];
                        in.readFully(ack);
                        return ack;
                    } catch (java.io.IOException e) {
                        throw new java.io.UncheckedIOException(e);
                    }
                });
                out.write(new byte[] {'b', 'c', 0x40, 2, 0, 7});
                out.flush();
                assertArrayEquals(new byte[] {0x40, 2, 0, 7}, rest.get(30, TimeUnit.SECONDS));
                assertArrayEquals(new byte[] {'a', 'b', 'c'}, body);
            }
        }
    }

    /**
     * Without a read timeout, a read waiting on a broker gone silent ends only by what Paho does when its keep-alive gives
     * up: it closes the socket, and before that interrupts the receiver's thread.
     */
    @Test
    void aReadWaitingOnASilentPeer_endsWhenTheSocketIsClosedFromAnotherThread() throws Exception {
        Throwable t = readOnSilentPeerEndedBy((s, reader) -> s.close());
        assertTrue(t instanceof java.io.IOException, t.toString());
    }

    @Test
    void aReadWaitingOnASilentPeer_endsWhenItsThreadIsInterrupted_andClosesTheSocket() throws Exception {
        Socket[] socket = new Socket[1];
        Throwable t = readOnSilentPeerEndedBy((s, reader) -> {
            socket[0] = s;
            reader.interrupt();
        });
        assertTrue(t instanceof java.nio.channels.ClosedByInterruptException || t instanceof java.net.SocketException, t.toString());
        assertTrue(socket[0].isClosed(), "the interrupt closed the socket");
    }

    interface Ending { void end(Socket s, Thread reader) throws Exception; }

    /** Starts a read on a connected peer that never sends, ends it with {@code ending} (at the read or just before it), returns what the read threw. */
    static Throwable readOnSilentPeerEndedBy(Ending ending) throws Exception {
        try (ServerSocket server = new ServerSocket(0, 1, InetAddress.getLoopbackAddress());
             Socket s = NoDelaySockets.plain().createSocket()) {
            s.connect(new InetSocketAddress(InetAddress.getLoopbackAddress(), server.getLocalPort()), 5000);
            try (Socket peer = server.accept()) {
                CompletableFuture<Throwable> ended = new CompletableFuture<>();
                CountDownLatch reading = new CountDownLatch(1);
                Thread reader = new Thread(() -> {
                    try {
                        reading.countDown();
                        int b = s.getInputStream().read();
                        ended.complete(new AssertionError("read returned " + b));
                    } catch (Throwable e) {
                        ended.complete(e);
                    }
                }, "silent-reader");
                reader.start();
                assertTrue(reading.await(30, TimeUnit.SECONDS));
                ending.end(s, reader);
                return ended.get(30, TimeUnit.SECONDS);
            }
        }
    }

    @Test
    void connectedVariants_areBufferedToo() throws Exception {
        try (ServerSocket server = new ServerSocket(0, 1, InetAddress.getLoopbackAddress());
             Socket s = NoDelaySockets.plain().createSocket(InetAddress.getLoopbackAddress(), server.getLocalPort());
             Socket peer = server.accept()) {
            assertTrue(s.isConnected() && s.getTcpNoDelay());
            assertTrue(s.getInputStream() instanceof java.io.BufferedInputStream);
            peer.getOutputStream().write(42);
            assertTrue(s.getInputStream().read() == 42);
        }
    }
}
