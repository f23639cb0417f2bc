package net.zbin.io.meter;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

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
import java.util.List;
import java.util.Locale;
import java.util.concurrent.CopyOnWriteArrayList;
import net.zbin.core.FaultKind;
import net.zbin.core.TestConditions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A meter zbin has never seen, described only by a profile written here: CR LF terminator, ';'
 * separator, status first, |Z| and θ in radians. A tiny responder in the test plays the meter.
 */
class SecondDialectTest {
    @TempDir
    Path dir;

    static final String PROFILE = """
            meter: test-bridge
            terminator: "\\r\\n"
            identify: {query: "ID?", expect: "^ACME BRIDGE"}
            setup: ["F={freq_hz}", "V={level_v}", "S={speed}"]
            speeds: {fast: 1, medium: 2, slow: 3}
            measure: {query: "M?", timeout_ms: 400}
            response:
              separator: ";"
              fields: [status, z_ohm, theta_rad, ignore]
              status_ok: "0"
              status_overload: ["9"]
            error: {query: "E?", none: "^none$"}
            timeouts: {command_ms: 300}
            transport: {tcp: {host: 127.0.0.1, port: %d}}
            """;

    @Test
    void profileOnlyDialect_worksWithoutCodeChange() throws Exception {
        List<String> heard = new CopyOnWriteArrayList<>();
        double z = 1591.5, theta = -1.5508; // radians, a lossy 100 nF at 1 kHz
        try (ServerSocket ss = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            Thread t = new Thread(() -> {
                try (Socket s = ss.accept(); BufferedReader in = new BufferedReader(new InputStreamReader(s.getInputStream(), StandardCharsets.US_ASCII));
                     OutputStream out = s.getOutputStream()) {
                    String line;
                    int n = 0;
                    while ((line = in.readLine()) != null) { // readLine strips the CR LF terminator
                        heard.add(line);
                        String reply = switch (line) {
                            case "ID?" -> "ACME BRIDGE 7,rev B";
                            case "M?" -> n++ == 1 ? "9;0;0;x" : String.format(Locale.ROOT, "0;%.6f;%.6f;x", z, theta);
                            case "E?" -> "none";
                            default -> null;
                        };
                        if (reply != null) { out.write((reply + "\r\n").getBytes(StandardCharsets.US_ASCII)); out.flush(); }
                    }
                } catch (Exception ignored) {
                    // test responder ends with the test
                }
            });
            t.setDaemon(true);
            t.start();
            Path p = dir.resolve("bridge.yaml");
            Files.writeString(p, String.format(Locale.ROOT, PROFILE, ss.getLocalPort()));
            try (ProfileMeterSession s = ProfileMeterSession.open(MeterProfileLoader.load(p), Clock.systemUTC())) {
                assertTrue(s.identify().startsWith("ACME"));
                s.apply(new TestConditions(1000, 0.5, "slow", 1));
                MeterReading r = s.measure();
                assertEquals(z * Math.cos(theta), r.reading().rOhm(), 1e-3);
                assertEquals(z * Math.sin(theta), r.reading().xOhm(), 1e-3);
                assertEquals(FaultKind.OVERLOAD, assertThrows(MeterException.class, s::measure).kind());
            }
        }
        // the error queue is read off before the setup and after each setup command
        assertEquals(List.of("ID?", "E?", "F=1000", "E?", "V=0.5", "E?", "S=3", "E?", "M?", "M?"), heard);
    }

    static final String SILENT_REFUSER = """
            meter: quiet-bridge
            setup: ["F={freq_hz}"]
            measure: {query: "M?", timeout_ms: 400}
            response: {separator: ",", fields: [r_ohm, x_ohm]}
            readback: {freq_hz: "F?"}
            timeouts: {command_ms: 300}
            transport: {tcp: {host: 127.0.0.1, port: %d}}
            """;

    @Test
    void aMeterThatIgnoresASettingWithoutAnError_isCaughtByTheReadBack() throws Exception {
        List<String> heard = new CopyOnWriteArrayList<>();
        try (ServerSocket ss = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            Thread t = new Thread(() -> {
                double freq = 1000;
                try (Socket s = ss.accept(); BufferedReader in = new BufferedReader(new InputStreamReader(s.getInputStream(), StandardCharsets.US_ASCII));
                     OutputStream out = s.getOutputStream()) {
                    String line;
                    while ((line = in.readLine()) != null) {
                        heard.add(line);
                        String reply = null;
                        if (line.startsWith("F=")) {
                            double want = Double.parseDouble(line.substring(2));
                            if (want <= 100_000) freq = want; // beyond its range it keeps the old one and says nothing
                        } else if (line.equals("F?")) reply = String.format(Locale.ROOT, "%.6E", freq);
                        else if (line.equals("M?")) reply = "100.0,-1591.5";
                        if (reply != null) { out.write((reply + "\n").getBytes(StandardCharsets.US_ASCII)); out.flush(); }
                    }
                } catch (Exception ignored) {
                    // test responder ends with the test
                }
            });
            t.setDaemon(true);
            t.start();
            Path p = dir.resolve("quiet.yaml");
            Files.writeString(p, String.format(Locale.ROOT, SILENT_REFUSER, ss.getLocalPort()));
            try (ProfileMeterSession s = ProfileMeterSession.open(MeterProfileLoader.load(p), Clock.systemUTC())) {
                s.apply(new TestConditions(1000, 1, "medium", 1));
                s.measure();
                MeterException e = assertThrows(MeterException.class, () -> s.apply(new TestConditions(1e6, 1, "medium", 1)));
                assertEquals(FaultKind.SETUP_REFUSED, e.kind());
                assertTrue(e.getMessage().contains("runs at freq_hz 1.000000E+03 where 1000000 was set"), e.getMessage());
                assertEquals(FaultKind.SETUP_REFUSED, assertThrows(MeterException.class, s::measure).kind(), "no reading under the old frequency");
            }
        }
        assertEquals(1, heard.stream().filter("M?"::equals).count(), "one reading only, at the frequency that took: " + heard);
    }
}
