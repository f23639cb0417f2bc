package net.zbin.io.mqtt;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.DataInputStream;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.InetSocketAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.net.SocketTimeoutException;
import org.junit.jupiter.api.Test;

/** The MQTT sockets: no Nagle delay, and a buffered read that loses nothing when a read times out. */
class NoDelaySocketsTest {
    @Test
    void plainSocket_readsThroughOneBuffer_andKeepsBytesAcrossAReadTimeout() throws Exception {
        try (ServerSocket server = new ServerSocket(0, 1, InetAddress.getLoopbackAddress());
             Socket s = NoDelaySockets.plain().createSocket()) {
            s.connect(new InetSocketAddress(InetAddress.getLoopbackAddress(), server.getLocalPort()), 5000);
            s.setSoTimeout(50); // as Paho sets it: its reader loops over timeouts
            try (Socket peer = server.accept()) {
                assertTrue(s.getTcpNoDelay());
                assertSame(s.getInputStream(), s.getInputStream(), "one buffered stream per socket");
                DataInputStream in = new DataInputStream(s.getInputStream()); // read as Paho reads: a byte, then the rest
                assertThrows(SocketTimeoutException.class, in::readByte);
                OutputStream out = peer.getOutputStream();
                out.write(new byte[] {0x30, 3, 'a'}); // a packet cut short: its last bytes come later
                out.flush();
                assertTrue(in.readByte() == 0x30 && in.readByte() == 3);
                byte[] body = new byte[3];
                body[0] = in.readByte();
                assertThrows(SocketTimeoutException.class, in::readByte);
                out.write(new byte[] {'b', 'c', 0x40, 2, 0, 7});
                out.flush();
                in.readFully(body, 1, 2);
                assertArrayEquals(new byte[] {'a', 'b', 'c'}, body);
                byte[] ack = new byte[4];
                in.readFully(ack);
                assertArrayEquals(new byte[] {0x40, 2, 0, 7}, ack);
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
