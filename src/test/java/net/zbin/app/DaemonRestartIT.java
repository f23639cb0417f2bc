package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
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
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The real {@code zbin run} process killed with SIGKILL five times during a lot, and started again each time. */
class DaemonRestartIT {
    static final ObjectMapper M = new ObjectMapper();

    /** Kept when the test fails: the daemons' logs are in it (its path is printed at the start). */
    @TempDir(cleanup = org.junit.jupiter.api.io.CleanupMode.ON_SUCCESS)
    Path dir;

    /** Every daemon the test starts (two loaded runs that failed had left theirs running for the rest of the suite). */
    final StartedProcesses started = new StartedProcesses();

    @org.junit.jupiter.api.AfterEach
    void stopAll() throws InterruptedException { started.stopAll(); }

    Process start(Path cfg, int n) throws Exception {
        return started.add(new ProcessBuilder("java", "-jar", Jar.path(), "run", "--config", cfg.toString())
                .redirectErrorStream(true).redirectOutput(dir.resolve("daemon-" + n + ".log").toFile()).start());
    }

    @Test
    void killNineFiveTimes_noContradictoryBin_everyAnswerHasItsRow_andTheLotContinues() throws Exception {
        System.out.println("DaemonRestartIT: the daemons' logs in " + dir + " (kept if the test fails)");
        Scenario sc = LineRig.quietMeter(Scenario.builtIn());
        Contacts contacts = new Contacts();
        SimMeter meter = new SimMeter(contacts, sc.fixture().toFixture(), Clock.systemUTC(), sc.seed(), 0, SimMeter.RandomFaults.NONE);
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             SimTcpServer sim = new SimTcpServer(meter, 0);
             Tap tap = new Tap(broker.url(), "zbin/crash/decision", "zbin/crash/state", "zbin/crash/dashboard")) {
            Path cfg = TestLine.write(dir, "crash", broker.url(), sim.port(), "dashboard: {interval_s: 0.5}\nhandler: {repeat_window_ms: 60000}\n");
            Process daemon = start(cfg, 0);
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("online").asBoolean(), 1, 30_000);
            HandlerSim.Options o = new HandlerSim.Options(broker.url(), "zbin", "crash", 2500, 100, 150, 90_000, 0, 0, 3,
                    "handler-crash", NoDelaySockets.plain(), null, null, 90_000);
            ExecutorService run = Executors.newSingleThreadExecutor();
            HandlerSim h = new HandlerSim(o, sc, PartLoader.direct(contacts));
            java.util.concurrent.atomic.AtomicLong presented = new java.util.concurrent.atomic.AtomicLong();
            Future<HandlerSim.Summary> f = run.submit(() -> h.run(p -> presented.set(p.parts())));
            for (int i = 1; i <= 5; i++) {
                TestLine.awaitParts(presented, 300L * i, f); // a kill every 300 parts, however fast the machine is
                daemon.destroyForcibly().waitFor(10, TimeUnit.SECONDS); // SIGKILL
                daemon = start(cfg, i);
            }
            HandlerSim.Summary s = f.get(5, TimeUnit.MINUTES);
            h.close();
            run.shutdown();

            // Redelivery after a kill -9: the last 50 measured presentations' triggers come again and get the same bins, as
            // repeats. A presentation answered without a reading (on a loaded machine a trigger can wait past the deadline:
            // stale-trigger) is measured when its trigger comes again, as the README says, so it is not among them.
            List<JsonNode> answered = tap.on("/decision").stream().map(Tap.Msg::json).filter(j -> !j.path("repeat").asBoolean()).toList();
            List<JsonNode> measured = answered.stream()
                    .filter(j -> Reason.parse(j.path("reason").asText()).kind() != Reason.Kind.NOT_MEASURED).toList();
            List<JsonNode> last = measured.subList(measured.size() - 50, measured.size());
            daemon.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
            int mark = tap.msgs.size();
            daemon = start(cfg, 6);
            tap.awaitFrom(mark, m -> m.topic().endsWith("/state") && m.json().path("online").asBoolean(), 1, 30_000);
            int sent = tap.msgs.size();
            for (JsonNode d : last)
                tap.publish("zbin/crash/trigger", "{\"seq\": " + d.path("seq").asLong() + ", \"part\": \"" + d.path("part").asText()
                        + "\", \"lot\": \"" + d.path("lot").asText() + "\"}");
            List<Tap.Msg> again = tap.awaitFrom(sent, m -> m.topic().endsWith("/decision"), 50, 30_000);
            for (int i = 0; i < 50; i++) {
                JsonNode a = again.get(i).json(), d = last.get(i);
                assertTrue(a.path("repeat").asBoolean(), "answered from the rebuilt book, not measured again: " + a);
                assertEquals(d.path("seq").asLong(), a.path("seq").asLong());
                assertEquals(d.path("bin").asInt(), a.path("bin").asInt(), "the same bin after the restart");
            }
            daemon.destroy(); // SIGTERM: clean stop, final dashboard
            assertTrue(daemon.waitFor(30, TimeUnit.SECONDS));
            // A presentation the handler re-sent during the run got its repeat answer then; the restarted daemon's answer to the
            // same trigger is the same bytes (a decision read back from the record log gives the same payload: RecordLogTest).
            java.util.Set<String> earlier = tap.msgs.subList(0, sent).stream().map(Tap.Msg::raw).collect(java.util.stream.Collectors.toSet());
            long sameBytes = again.stream().limit(50).filter(m -> earlier.contains(m.raw())).count();
            System.out.println("kill -9 x5: " + s.finished() + " parts finished, " + h.resent() + " triggers resent, repeats answered "
                    + s.repeatsAnswered() + ", " + (answered.size() - measured.size()) + " answered without a reading; after the last restart "
                    + sameBytes + " of the 50 answers the same bytes as an answer before it");
            assertEquals(0, s.missing(), "every trigger re-sent by the handler got a decision");
            assertEquals(0, s.contradictory());
            assertEquals(0, s.stale());

            Map<String, Integer> rowBin = new HashMap<>();
            long graded = 0;
            Path records = dir.resolve("records-crash");
            try (var files = Files.list(records)) {
                for (Path p : files.sorted().toList()) {
                    try (var csv = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(Files.newBufferedReader(p))) {
                        for (CSVRecord r : csv) {
                            if (r.get("kind").equals("part") && !r.get("verdict").equals("retest") && !r.get("param").isEmpty()) graded++;
                            Integer was = rowBin.put(r.get("seq") + "/" + r.get("part"), Integer.parseInt(r.get("bin")));
                            assertTrue(was == null, "one row per presentation: " + r);
                        }
                    }
                }
            }
            Map<String, Integer> seen = new HashMap<>();
            for (Tap.Msg m : tap.on("/decision")) {
                String key = m.json().path("seq").asLong() + "/" + m.json().path("part").asText();
                int bin = m.json().path("bin").asInt();
                Integer row = rowBin.get(key);
                assertTrue(row != null, "the decision the handler got has its row: " + m.raw());
                assertEquals(row.intValue(), bin, "row and decision agree: " + key);
                Integer before = seen.putIfAbsent(key, bin);
                assertTrue(before == null || before == bin, "one presentation, one bin: " + key);
            }
            List<Tap.Msg> dashboards = tap.on("/dashboard");
            JsonNode dash = dashboards.get(dashboards.size() - 1).json();
            assertEquals(s.finished(), dash.path("parts").asLong(), "the dashboard continued the lot across restarts: " + dash);
            assertEquals(graded, dash.path("monitor").path("parts").asLong(), "the monitor continued the lot too: no reset, no double count");
            long parts = 0, passed = 0;
            try (var files = Files.list(records)) {
                for (Path log : files.sorted().toList()) { // one file, or two if the lot ran over midnight UTC
                    Cli replay = Cli.run("replay", "--recipe", "config/recipes/mlcc-x7r-100n.yaml", "--in", log.toString(), "--json", "--strict");
                    assertEquals(0, replay.exit(), replay.err());
                    JsonNode rj = M.readTree(replay.out());
                    parts += rj.path("parts").asLong();
                    passed += rj.path("passed").asLong();
                }
            }
            assertEquals(dash.path("parts").asLong(), parts);
            assertEquals(dash.path("yield_pct").asDouble(), Math.round(10_000.0 * passed / parts) / 100.0, 1e-9,
                    "replay --strict reproduces the live yield");
        }
    }
}
