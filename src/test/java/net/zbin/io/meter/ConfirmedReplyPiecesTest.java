package net.zbin.io.meter;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import net.zbin.core.FaultKind;
import net.zbin.core.TestConditions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.ThrowingConsumer;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

/**
 * A confirmed reading's reply and the sync answer behind it may reach zbin in one piece (an instrument sending its output
 * queue for the two queries at once, as zbin's simulator does) or in several (each answer as it is ready, or a line cut
 * by the transport): the reading is the same either way. A responder in the test plays the meter and cuts its bytes.
 */
class ConfirmedReplyPiecesTest {
    @TempDir
    Path dir;

    static final String PROFILE = """
            meter: pieces
            setup: ["F={freq_hz}"]
            sync: {query: "*OPC?", expect: "^1$"}
            measure: {query: "M?", timeout_ms: 1000, confirm: true}
            response: {separator: ",", fields: [r_ohm, x_ohm, status], status_ok: "OK"}
            timeouts: {command_ms: 1000}
            transport: {tcp: {host: 127.0.0.1, port: %d}}
            """;

    /** How the responder sends the answers to {@code M?} and {@code *OPC?}. */
    enum Pieces {
        /** Both answers in one write. */
        TOGETHER,
        /** The reply, then the sync answer 20 ms later. */
        APART,
        /** The reply cut in the middle of its first field, then the rest with the sync answer 20 ms later. */
        REPLY_CUT,
        /** The reply without its terminator, then the terminator and the sync answer 20 ms later. */
        TERMINATOR_LATE,
        /** Not a piecing: the reply, then a stray line and the sync answer in one write 20 ms later. */
        STRAY_BETWEEN
    }

    @ParameterizedTest
    @EnumSource(value = Pieces.class, names = "STRAY_BETWEEN", mode = EnumSource.Mode.EXCLUDE)
    void aConfirmedReading_isTheSameHoweverItsBytesArePieced(Pieces pieces) throws Throwable {
        withMeter(pieces, s -> {
            for (int i = 0; i < 3; i++) {
                MeterReading r = s.measure();
                assertEquals(100.25, r.reading().rOhm(), 0);
                assertEquals(-1591.5, r.reading().xOhm(), 0);
            }
        });
    }

    @Test
    void aStrayLineBetweenTheReplyAndTheSyncAnswer_isGarbled_andNoReading() throws Throwable {
        withMeter(Pieces.STRAY_BETWEEN, s -> {
            MeterException e = assertThrows(MeterException.class, s::measure);
            assertEquals(FaultKind.GARBLED, e.kind(), e.getMessage());
        });
    }

    private void withMeter(Pieces pieces, ThrowingConsumer<ProfileMeterSession> use) throws Throwable {
        try (ServerSocket ss = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            Thread t = new Thread(() -> serve(ss, pieces, REPLY));
            t.setDaemon(true);
            t.start();
            Path p = dir.resolve("pieces.yaml");
            Files.writeString(p, String.format(java.util.Locale.ROOT, PROFILE, ss.getLocalPort()));
            try (ProfileMeterSession s = ProfileMeterSession.open(MeterProfileLoader.load(p), Clock.systemUTC())) {
                s.apply(new TestConditions(1000, 1, "medium", 1));
                use.accept(s);
            }
        }
    }

    private static final String REPLY = "100.25,-1591.5,OK";

    private static void serve(ServerSocket ss, Pieces pieces, String reply) {
        try (Socket s = ss.accept(); BufferedReader in = new BufferedReader(new InputStreamReader(s.getInputStream(), StandardCharsets.US_ASCII));
             OutputStream out = s.getOutputStream()) {
            s.setTcpNoDelay(true);
            String line;
            boolean measuring = false;
            while ((line = in.readLine()) != null) {
                if (line.equals("M?")) {
                    measuring = true;
                } else if (line.equals("*OPC?") && measuring) {
                    measuring = false;
                    String whole = reply + "\n";
                    switch (pieces) {
                        case TOGETHER -> send(out, whole + "1\n");
                        case APART -> { send(out, whole); pause(); send(out, "1\n"); }
                        case REPLY_CUT -> { send(out, whole.substring(0, 3)); pause(); send(out, whole.substring(3) + "1\n"); }
                        case TERMINATOR_LATE -> { send(out, reply); pause(); send(out, "\n1\n"); }
                        case STRAY_BETWEEN -> { send(out, whole); pause(); send(out, "99,99,OK\n1\n"); }
                    }
                } else if (line.equals("*OPC?")) {
                    send(out, "1\n");
                }
            }
        } catch (Exception ignored) {
            // the responder ends with the test
        }
    }

    private static void send(OutputStream out, String text) throws java.io.IOException {
        out.write(text.getBytes(StandardCharsets.US_ASCII));
        out.flush();
    }

    private static void pause() throws InterruptedException { Thread.sleep(20); }
}
