package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.stream.Stream;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/** A line config that cannot be fully loaded stops with exit 2, naming the file and key. */
class LineConfigMistakesTest {
    @TempDir
    Path dir;

    static Stream<Arguments> mistakes() {
        return Stream.of(
                Arguments.of("unknown key", "colour: red\n", "colour", null),
                Arguments.of("bad broker url", "", "mqtt.broker", "tcp://127.0.0.1:1883|http://x"),
                Arguments.of("ssl without CA", "", "mqtt.tls.ca_file", "tcp://127.0.0.1:1883|ssl://127.0.0.1:8883"),
                Arguments.of("missing password variable", "", "mqtt.password_env", "topic_root: zbin}|topic_root: zbin, password_env: ZBIN_NO_SUCH_VAR_42}"),
                Arguments.of("missing password file", "", "mqtt.password_file", "topic_root: zbin}|topic_root: zbin, password_file: nope.pass}"),
                Arguments.of("missing CA file", "", "mqtt.tls.ca_file", "topic_root: zbin}|topic_root: zbin, tls: {ca_file: ca.pem}}"),
                Arguments.of("wildcard topic root", "", "mqtt.topic_root", "topic_root: zbin}|topic_root: 'zbin/#'}"),
                Arguments.of("unknown active recipe", "", "recipes.active", "active: mlcc-x7r-100n|active: nothing-here"),
                Arguments.of("missing profile", "", "meters/none.yaml", "meters/zbin-sim.yaml|meters/none.yaml"),
                Arguments.of("bad transport", "", "meter.transport.tcp.port", "port: 5025|port: many"),
                Arguments.of("both tcp and serial", "", "meter.transport.tcp", "transport: {tcp: {host: 127.0.0.1, port: 5025}}|transport: {tcp: {port: 1}, serial: {port: /dev/null}}"),
                Arguments.of("bad on_failure", "", "records.on_failure", "flush_ms: 50}|flush_ms: 50, on_failure: shrug}"),
                Arguments.of("bad line id", "", "line", "line: ok-line|line: 'has space'"),
                Arguments.of("bad fixture limit", "fixture: {repeats: 0}\n", "fixture.repeats", null),
                Arguments.of("stray limit in farads", "fixture: {open_max_f: 20}\n", "fixture.open_max_f", null),
                Arguments.of("short limit of a resistor", "fixture: {short_max_ohm: 470}\n", "fixture.short_max_ohm", null),
                Arguments.of("open check in farads", "fixture: {open_check_f: 1}\n", "fixture.open_check_f", null));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("mistakes")
    void lineConfigMistake_exits2NamingTheKey(String what, String extra, String key, String replace) throws Exception {
        Path cfg = TestLine.write(dir, "ok-line", "tcp://127.0.0.1:1883", 5025, extra);
        if (replace != null) {
            String[] r = replace.split("\\|", 2);
            String text = Files.readString(cfg);
            assertTrue(text.contains(r[0]), what + ": test setup");
            Files.writeString(cfg, text.replace(r[0], r[1]));
        }
        Cli c = Cli.run("check", "--config", cfg.toString());
        assertEquals(2, c.exit(), what + ": " + c.out() + c.err());
        assertTrue(c.err().contains(key), what + ": names '" + key + "': " + c.err());
    }

    @org.junit.jupiter.api.Test
    void aStrayLimitWrittenAsAPlainNumber_isRefusedNamingTheLikelyMeantPicofarads() throws Exception {
        Path cfg = TestLine.write(dir, "ok-line", "tcp://127.0.0.1:1883", 5025, "fixture: {open_max_f: 20}\n");
        Cli c = Cli.run("check", "--config", cfg.toString());
        assertEquals(2, c.exit());
        assertTrue(c.err().contains("fixture.open_max_f: must be at most 1 nF") && c.err().contains("did you mean 20 pF (`20p`"), c.err());
    }
}
