package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.HashMap;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import net.zbin.core.Reason;
import net.zbin.io.mqtt.NoDelaySockets;
import net.zbin.sim.Contacts;
import net.zbin.sim.HandlerSim;
import net.zbin.sim.PartLoader;
import net.zbin.sim.Scenario;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;

/**
 * One line with everything real and every part of it breakable on demand: a Mosquitto process, the
 * {@code zbin run} process, the meter simulator on a fixed TCP port (with random meter faults), and the
 * handler simulator. Used by the combined fault test in CI and by the long soak.
 */
final class FaultedLine implements AutoCloseable {
    static final ObjectMapper M = new ObjectMapper();
    /**
     * Meter faults drawn per measurement: timeouts, garbled replies, overloads, a stray line after a reply and a
     * reply that comes late on its own (invented rates, a rough meter).
     */
    static final SimMeter.RandomFaults ROUGH_METER = new SimMeter.RandomFaults(0.001, 0.002, 0.002, 0.003, 0.0005);

    final Path dir;
    final String line;
    final Scenario scenario = LineRig.quietMeter(Scenario.builtIn());
    final Contacts contacts = new Contacts();
    final MosquittoProcess broker;
    private final SimMeter meter;
    private final int meterPort;
    private SimTcpServer meterServer;
    private final Path cfg;
    private Process daemon;
    private int starts;
    int brokerKills, meterRestarts;

    FaultedLine(Path dir, String line) throws Exception {
        this.dir = dir;
        this.line = line;
        broker = new MosquittoProcess(dir, "");
        meter = new SimMeter(contacts, scenario.fixture().toFixture(), Clock.systemUTC(), scenario.seed(), 0, ROUGH_METER);
        meterServer = new SimTcpServer(meter, 0);
        meterPort = meterServer.port();
        cfg = TestLine.write(dir, line, broker.url(), meterPort, "dashboard: {interval_s: 1}\nhandler: {repeat_window_ms: 60000}\n");
        // a short keep-alive: a connection the broker's death leaves half-open is found within seconds
        TestLine.mqttKeys(cfg, "keepalive_s: 2");
        startDaemon();
        untilOnline();
    }

    void startDaemon() throws Exception {
        daemon = new ProcessBuilder("java", "-Xmx256m", "-jar", Jar.path(), "run", "--config", cfg.toString())
                .redirectErrorStream(true).redirectOutput(dir.resolve("daemon-" + starts++ + ".log").toFile()).start();
    }

    long daemonPid() { return daemon.pid(); }

    /** Waits until a fresh client sees the line's retained state online. */
    double untilOnline() throws Exception {
        return DaemonPromisesIT.untilOnline(broker.url(), "zbin/" + line + "/state", System.nanoTime());
    }

    HandlerSim handler(long parts, double rate) throws Exception {
        HandlerSim.Options o = new HandlerSim.Options(broker.url(), "zbin", line, parts, rate, 150, 120_000, 0, 0, 3,
                "handler-" + line + "-" + System.nanoTime(), NoDelaySockets.plain(), null, null, 120_000);
        return new HandlerSim(o, scenario, PartLoader.direct(contacts));
    }

    /** SIGKILL to the broker, half a second away, started again; returns seconds until the line is online again. */
    double killBroker() throws Exception {
        broker.kill();
        Thread.sleep(500);
        long t0 = System.nanoTime();
        broker.start();
        brokerKills++;
        return DaemonPromisesIT.untilOnline(broker.url(), "zbin/" + line + "/state", t0);
    }

    /** kill -9 of the daemon, started again at once; returns seconds until it is online again. */
    double killDaemon() throws Exception {
        daemon.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
        long t0 = System.nanoTime();
        startDaemon();
        return DaemonPromisesIT.untilOnline(broker.url(), "zbin/" + line + "/state", t0);
    }

    /** The meter's TCP server closed (its link drops) and opened again on the same port after a second. */
    void restartMeter() throws Exception {
        meterServer.close();
        Thread.sleep(1000);
        meterServer = new SimTcpServer(meter, meterPort);
        meterRestarts++;
    }

    /** Clean stop of the daemon (SIGTERM: final dashboard, offline), then the retained final dashboard. */
    JsonNode stop() throws Exception {
        daemon.destroy();
        assertTrue(daemon.waitFor(30, TimeUnit.SECONDS), "clean stop");
        try (Tap t = new Tap(broker.url(), "zbin/" + line + "/dashboard")) {
            return t.await(m -> m.json() != null && "offline".equals(m.json().path("mode").asText()), 1, 10_000).get(0).json();
        }
    }

    /**
     * The record log after the run: one row per presentation, no pass for a reading that was not clean, and
     * `replay --strict` reads every row and gives the figures of the final dashboard.
     */
    void checkRecords(JsonNode dash) throws Exception {
        Map<String, Integer> rowBin = new HashMap<>();
        long unclean = 0;
        Path records = dir.resolve("records-" + line);
        long parts = 0, passed = 0;
        try (var files = Files.list(records)) {
            for (Path p : files.sorted().toList()) {
                try (var csv = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(Files.newBufferedReader(p))) {
                    for (CSVRecord r : csv) {
                        Integer was = rowBin.put(r.get("seq") + "/" + r.get("part") + "/" + r.get("lot"), Integer.parseInt(r.get("bin")));
                        assertTrue(was == null, "one row per presentation: " + r);
                        if (Reason.parse(r.get("reason")).kind() == Reason.Kind.UNCLEAN) {
                            unclean++;
                            assertNotEquals("pass", r.get("verdict"), "a reading that was not clean never passes: " + r);
                        }
                    }
                }
                Cli replay = Cli.run("replay", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", p.toString(), "--json", "--strict");
                assertEquals(0, replay.exit(), replay.err());
                JsonNode rj = M.readTree(replay.out());
                parts += rj.path("parts").asLong();
                passed += rj.path("passed").asLong();
            }
        }
        assertTrue(unclean > 0, "the rough meter's faults reached the log (else this run proved nothing about them)");
        assertEquals(dash.path("parts").asLong(), parts, "the dashboard continued the lot across every fault");
        assertEquals(dash.path("yield_pct").asDouble(), Math.round(10_000.0 * passed / parts) / 100.0, 1e-9,
                "replay --strict reproduces the live yield");
    }

    @Override
    public void close() throws Exception {
        if (daemon.isAlive()) daemon.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
        meterServer.close();
        broker.close();
    }
}
