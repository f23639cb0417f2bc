package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import java.util.concurrent.TimeUnit;
import net.zbin.sim.Contacts;
import net.zbin.sim.PartModel;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The real {@code zbin run} process, driven by clients that are not part of the project. */
class DaemonProcessIT {
    @TempDir
    Path dir;

    /** The shipped config/ folder, copied; only the broker and meter ports are the test's own. */
    Path shippedConfig(int brokerPort, int meterPort) throws Exception {
        Path conf = dir.resolve("config");
        try (var files = Files.walk(Path.of("config"))) {
            for (Path p : files.toList()) {
                Path to = conf.resolve(Path.of("config").relativize(p).toString());
                if (Files.isDirectory(p)) Files.createDirectories(to);
                else Files.copy(p, to);
            }
        }
        Path line = conf.resolve("line.yaml");
        String text = Files.readString(line);
        assertTrue(text.contains("broker: tcp://127.0.0.1:1883") && text.contains("port: 5025"), "shipped config as documented");
        Files.writeString(line, text.replace("broker: tcp://127.0.0.1:1883", "broker: tcp://127.0.0.1:" + brokerPort)
                .replace("port: 5025", "port: " + meterPort));
        return line;
    }

    /** Every daemon a test starts: none may outlive a failed test (it would redial the next test's broker). */
    final StartedProcesses started = new StartedProcesses();

    @org.junit.jupiter.api.AfterEach
    void stopAll() throws InterruptedException { started.stopAll(); }

    Process startDaemon(Path cfg) throws Exception {
        return started(new ProcessBuilder("java", "-jar", Jar.path(), "run", "--config", cfg.toString())
                .redirectErrorStream(true).redirectOutput(dir.resolve("daemon-" + System.nanoTime() + ".log").toFile()).start());
    }

    Process started(Process p) { return started.add(p); }

    @Test
    void throughMosquitto_mosquittoClientsDriveZbinRun_cleanStopAndKillNineBothLeaveItOffline() throws Exception {
        try (MosquittoProcess broker = new MosquittoProcess(dir, "")) {
            driveAndKill(broker.url(), broker.port);
        }
    }

    @Test
    void throughMoquette_mosquittoClientsDriveZbinRun_cleanStopAndKillNineBothLeaveItOffline() throws Exception {
        try (EmbeddedBroker broker = new EmbeddedBroker(Files.createDirectories(dir.resolve("moquette")))) {
            driveAndKill(broker.url(), broker.port());
        }
    }

    /** One trigger (seq 1) sent with mosquitto_pub, its decision heard with mosquitto_sub subscribed before it. */
    static JsonNode viaMosquittoClients(int brokerPort) throws Exception {
        // line-buffered (stdbuf): its debug output says when it is subscribed, and a pipe would hold it back
        Process sub = new ProcessBuilder("stdbuf", "-oL", "-eL", "mosquitto_sub", "-d", "-h", "127.0.0.1", "-p", Integer.toString(brokerPort), "-q", "1",
                "-t", "zbin/hg-line-2/decision", "-C", "1", "-W", "20").redirectErrorStream(true).start();
        java.io.BufferedReader subOut = new java.io.BufferedReader(new java.io.InputStreamReader(sub.getInputStream(), StandardCharsets.UTF_8));
        for (String l = subOut.readLine(); ; l = subOut.readLine()) {
            assertTrue(l != null, "mosquitto_sub ended before it subscribed");
            if (l.contains("SUBACK")) break;
        }
        Process pub = new ProcessBuilder("mosquitto_pub", "-h", "127.0.0.1", "-p", Integer.toString(brokerPort), "-q", "1",
                "-t", "zbin/hg-line-2/trigger", "-m", "{\"seq\": 1, \"part\": \"ext-0001\", \"lot\": \"HG-EXT\"}").start();
        assertTrue(pub.waitFor(10, TimeUnit.SECONDS));
        assertTrue(sub.waitFor(25, TimeUnit.SECONDS));
        List<String> rest = subOut.lines().toList();
        String payload = rest.stream().filter(l -> l.startsWith("{")).findFirst().orElseThrow(() -> new AssertionError("no payload: " + rest));
        return new ObjectMapper().readTree(payload);
    }

    void driveAndKill(String brokerUrl, int brokerPort) throws Exception {
        SimMeter meter = new SimMeter(new Contacts(), net.zbin.sim.Fixture.IDEAL, Clock.systemUTC(), 9, 0, SimMeter.RandomFaults.NONE);
        meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        try (SimTcpServer sim = new SimTcpServer(meter, 0);
             Tap tap = new Tap(brokerUrl, "zbin/hg-line-2/state")) {
            Path cfg = shippedConfig(brokerPort, sim.port());

            Process daemon = startDaemon(cfg);
            tap.await(m -> m.json().path("online").asBoolean(), 1, 20_000);
            // The README's example: mosquitto_sub waits for one decision, mosquitto_pub sends a trigger — again after a
            // stale-trigger answer, as a handler does (a stand-still of a loaded machine as the trigger is taken up)
            JsonNode d = Tap.againWhileStale(() -> viaMosquittoClients(brokerPort));
            assertEquals(1, d.path("seq").asLong());
            assertEquals("J", d.path("grade").asText());
            assertEquals("ext-0001", d.path("part").asText());

            daemon.destroy(); // SIGTERM: clean stop
            assertTrue(daemon.waitFor(20, TimeUnit.SECONDS));
            JsonNode clean = tap.await(m -> !m.json().path("online").asBoolean(), 1, 10_000).get(0).json();
            assertEquals("offline", clean.path("mode").asText());

            int before = tap.msgs.size();
            Process again = startDaemon(cfg);
            tap.awaitFrom(before, m -> m.json().path("online").asBoolean(), 1, 20_000);
            int online = tap.msgs.size();
            try (Tap decisions = new Tap(brokerUrl, "zbin/hg-line-2/decision")) {
                // as a handler presents parts: one trigger, its answer, the next (a burst of 300 at a line that has just
                // started would be answered stale-trigger beyond the 150 ms deadline, which is not what this test is about)
                for (int i = 0; i < 300; i++) decisions.present("hg-line-2", 1000 + i);
            }
            // No wait for the flush: a row reaches the operating system before its decision is published, so a SIGKILL
            // right after the last answer loses nothing (only a power loss waits on the flush interval).
            again.destroyForcibly(); // SIGKILL: only the Will can tell
            assertTrue(again.waitFor(10, TimeUnit.SECONDS));
            JsonNode will = tap.awaitFrom(online, m -> !m.json().path("online").asBoolean(), 1, 15_000).get(0).json();
            assertEquals("offline", will.path("mode").asText());

            // Nothing answered is lost to the SIGKILL, and the log reads back clean.
            Path records = dir.resolve("records");
            Path log;
            try (var files = Files.list(records)) {
                log = files.filter(f -> f.toString().endsWith(".csv")).findFirst().orElseThrow();
            }
            Cli replay = Cli.run("replay", "--recipe", dir.resolve("config/recipes/mlcc-x7r-100n.yaml").toString(), "--in", log.toString(),
                    "--json", "--strict");
            assertEquals(0, replay.exit(), replay.err());
            assertEquals(301, new ObjectMapper().readTree(replay.out()).path("total").asLong(), "seq 1 and the 300 after it");
        }
    }
}
