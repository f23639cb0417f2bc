package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.stream.Collectors;
import net.zbin.sim.HandlerSim;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The daemon end to end through a real broker; subclasses give the broker. */
abstract class DaemonEndToEndContract {
    static final ObjectMapper M = new ObjectMapper();

    @TempDir
    Path dir;

    abstract String broker();

    static boolean isDecision(Tap.Msg m) { return m.topic().endsWith("/decision"); }

    @Test
    void fiveThousandTriggersAt200PerSecond_exactlyOneDecisionEach_binsAsIndependentGradingPredicts() throws Exception {
        try (LineRig rig = new LineRig(dir, "e2e", broker(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker(), "zbin/e2e/#")) {
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("online").asBoolean() && m.json().path("mode").asText().equals("ready"), 1, 10_000);
            rig.compensate();
            HandlerSim.Summary s = rig.runHandler(5000, 200, 500, 50);
            assertEquals(0, s.missing(), "missing");
            assertEquals(0, s.duplicate(), () -> "duplicate: " + s.duplicateAnswers());
            assertEquals(0, s.contradictory(), "contradictory");
            assertEquals(100, s.deliberateRepeats());
            // every deliberate repeat is answered as a repeat; so is a trigger the handler sent again for want of an answer in
            // time (a loaded machine), once its first presentation was decided
            assertTrue(s.repeatsAnswered() >= 100 && s.repeatsAnswered() <= 100 + s.resent(),
                    "repeats answered " + s.repeatsAnswered() + ", deliberate 100, re-sent " + s.resent());
            long expected = s.triggers() - 100;
            List<Tap.Msg> decisions = tap.await(m -> isDecision(m) && !m.json().path("repeat").asBoolean(), (int) expected, 30_000);
            Map<Long, List<JsonNode>> bySeq = decisions.stream().map(Tap.Msg::json).collect(Collectors.groupingBy(j -> j.path("seq").asLong()));
            assertEquals(expected, bySeq.size(), "one decision per seq");
            bySeq.forEach((seq, l) -> assertEquals(1, l.size(), "seq " + seq));
            List<JsonNode> repeats = tap.on("/decision").stream().map(Tap.Msg::json).filter(j -> j.path("repeat").asBoolean()).toList();
            for (JsonNode r : repeats) assertEquals(bySeq.get(r.path("seq").asLong()).get(0).path("bin").asInt(), r.path("bin").asInt());

            rig.close();
            // the broker forwards the final messages to the tap after it acknowledged them to the daemon: wait for them
            tap.await(m -> m.topic().endsWith("/state") && !m.json().path("online").asBoolean(true), 1, 10_000);
            tap.await(m -> m.topic().endsWith("/dashboard") && m.json().path("mode").asText().equals("offline"), 1, 10_000);
            assertEquals("false", tap.on("/state").get(tap.on("/state").size() - 1).json().path("online").asText(), "offline on clean stop");
            List<Tap.Msg> dashboards = tap.on("/dashboard");
            JsonNode dash = dashboards.get(dashboards.size() - 1).json();
            Map<Integer, Long> published = new TreeMap<>();
            int graded = 0;
            for (Path f : rig.recordFiles()) {
                try (var p = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(Files.newBufferedReader(f))) {
                    for (CSVRecord r : p) {
                        JsonNode d = bySeq.get(Long.parseLong(r.get("seq"))).get(0);
                        assertEquals(d.path("bin").asInt(), Integer.parseInt(r.get("bin")), "record row agrees with the decision");
                        if (!r.get("kind").equals("part")) continue;
                        if (!r.get("verdict").equals("retest")) published.merge(d.path("bin").asInt(), 1L, Long::sum);
                        if (r.get("r_ohm").isEmpty()) continue; // not measured (e.g. stale-trigger on a loaded machine): nothing to grade
                        int predicted = IndependentMlccGrader.bin(Double.parseDouble(r.get("r_ohm")), Double.parseDouble(r.get("x_ohm")),
                                Integer.parseInt(r.get("attempt")));
                        assertEquals(predicted, d.path("bin").asInt(), "seq " + r.get("seq") + ": " + d);
                        graded++;
                    }
                }
            }
            assertTrue(graded >= 5000, "every part graded (retests add rows): " + graded);
            long parts = published.values().stream().mapToLong(Long::longValue).sum();
            assertEquals(parts, dash.path("parts").asLong(), "final dashboard counts every finished part (retests apart)");
            assertEquals(s.finished(), dash.path("parts").asLong(), "the handler finished as many parts as the line counted");
            assertEquals(s.yieldPct(), dash.path("yield_pct").asDouble(), 0.005, "one yield: handler and dashboard");
            assertEquals("offline", dash.path("mode").asText(), "the retained dashboard says offline after a clean stop");
            assertEquals(parts, dash.path("last_hour").path("parts").asLong(), "a lot of less than an hour: all of it in the rolling hour");
            assertTrue(dash.path("last_10_min").path("parts").asLong() > 0 && dash.path("last_10_min").has("yield_low_pct"), dash.toString());
            // the line's count of repeats answered: the deliberate ones, plus triggers re-sent for want of an answer in time
            long lineRepeats = dash.path("repeats").asLong();
            assertTrue(lineRepeats >= 100 && lineRepeats <= 100 + s.resent(), "line repeats " + lineRepeats + ", re-sent " + s.resent());
            double y = dash.path("yield_pct").asDouble();
            assertTrue(dash.path("yield_low_pct").asDouble() < y && y < dash.path("yield_high_pct").asDouble(), dash.toString());
            assertTrue(dash.path("latency_ms").path("p99").asDouble() > 0, dash.toString());
            Cli replay = Cli.run("replay", "--recipe", rig.cfg.recipeDir().resolve("mlcc-x7r-100n.yaml").toString(),
                    "--in", rig.recordFiles().get(0).toString(), "--json");
            assertEquals(0, replay.exit(), replay.err());
            JsonNode replayed = M.readTree(replay.out());
            assertEquals(published, ReplayCommandTest.countsOf(replayed), "replay of the log = decisions published");
            assertEquals(dash.path("yield_pct").asDouble(), Math.round(replayed.path("yield_pct").asDouble() * 100) / 100.0, 1e-9,
                    "one yield: dashboard and replay");
        }
    }

    @Test
    void theStartsRehearsal_goesThroughTheBrokerAndTheMeterBeforeReady_andLeavesNoDecisionRowOrCount() throws Exception {
        try (Tap tap = new Tap(broker(), "zbin/reh/#");
             LineRig rig = new LineRig(dir, "reh", broker(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "")) {
            long readingsAtReady = rig.meter.measurements();
            Tap.Msg ready = tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 1, 10_000).get(0);
            int readyAt = tap.msgs.indexOf(ready);
            List<Tap.Msg> before = tap.msgs.subList(0, readyAt);
            long asks = before.stream().filter(m -> m.topic().equals("zbin/reh/rehearsal/ask")).count();
            long answers = before.stream().filter(m -> m.topic().equals("zbin/reh/rehearsal/answer")).count();
            assertTrue(asks >= 1 && answers >= 1, "rehearsal rounds through the broker before ready: asks " + asks + ", answers " + answers);
            assertTrue(answers <= asks, "an answer per ask at most");
            assertTrue(readingsAtReady >= answers, "the meter took a reading per round (" + readingsAtReady + " for " + answers + " answers)");
            assertTrue(tap.on("/decision").isEmpty() && tap.on("/rejected").isEmpty(), "no decision or notice for a rehearsal");
            // after ready the daemon ignores the rehearsal's topics: an ask sent now gets no answer, though a trigger sent after it does
            long answersBefore = tap.on("/rehearsal/answer").size();
            tap.publishAcknowledged("zbin/reh/rehearsal/ask", "{\"seq\": 1}");
            tap.publishAcknowledged("zbin/reh/trigger", "{\"seq\": 1, \"lot\": \"R1\"}");
            tap.await(DaemonEndToEndContract::isDecision, 1, 10_000);
            assertEquals(answersBefore, tap.on("/rehearsal/answer").size(), "an ask after ready is not answered");
            rig.close();
            assertEquals(1, rig.recordFiles().stream().mapToLong(f -> {
                try (var lines = Files.lines(f)) {
                    return lines.count() - 1;
                } catch (java.io.IOException e) {
                    throw new java.io.UncheckedIOException(e);
                }
            }).sum(), "one record row: the trigger's, none for the rehearsal");
            JsonNode dash = tap.await(m -> m.topic().endsWith("/dashboard") && m.json().path("mode").asText().equals("offline"), 1, 10_000).get(0).json();
            assertEquals(1, dash.path("presentations").asLong(), "the line counts the one presentation only: " + dash);
            assertEquals(1, dash.path("decisions").asLong(), "the line counts the one decision only: " + dash);
        }
    }

    @Test
    void thousandMalformedPayloads_eachGetARejectedNotice_andTheDaemonKeepsServing() throws Exception {
        try (LineRig rig = new LineRig(dir, "bad", broker(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker(), "zbin/bad/rejected", "zbin/bad/decision")) {
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            String topic = "zbin/bad/trigger";
            for (int i = 0; i < 1000; i++) {
                String p = switch (i % 5) {
                    case 0 -> "{seq: " + i;
                    case 1 -> "{\"seq\": \"" + i + "\"}";
                    case 2 -> "{\"part\": \"no-seq-" + i + "\"}";
                    case 3 -> "{\"seq\": " + i + ", \"part\": \"" + "x".repeat(5000) + "\"}";
                    default -> "[" + i + "]";
                };
                // every 50th waits for the broker's acknowledgement: the embedded Moquette, starved of CPU on a loaded
                // machine, closed the test client's connection in a flood of 1 000 unacknowledged QoS 1 messages
                if (i % 50 == 49) tap.publishAcknowledged(topic, p);
                else tap.publish(topic, p);
            }
            List<Tap.Msg> rejected = tap.await(m -> m.topic().endsWith("/rejected"), 1000, 60_000);
            for (Tap.Msg m : rejected) {
                assertEquals(topic, m.json().path("topic").asText());
                assertFalse(m.json().path("reason").asText().isEmpty());
            }
            // every oversize payload (case 3: 5 000+ bytes) is refused for its size, by the size it had
            List<Tap.Msg> oversize = rejected.stream().filter(m -> m.json().path("reason").asText().matches("payload is 5\\d{3} bytes, limit 4096")).toList();
            assertEquals(200, oversize.size(), "oversize payloads refused for their size");
            tap.publish(topic, "{\"seq\": 424242, \"part\": \"after-the-storm\"}");
            JsonNode d = tap.await(m -> isDecision(m) && m.json().path("seq").asLong() == 424242, 1, 10_000).get(0).json();
            assertEquals("J", d.path("grade").asText());
            assertEquals(0, tap.on("/decision").size() - 1, "no decision for any malformed payload");
        }
    }

    @Test
    void commands_answerOnTheResultTopic_andChangeWhatTheLineDoes() throws Exception {
        try (LineRig rig = new LineRig(dir, "cmd", broker(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker(), "zbin/cmd/#")) {
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            String c = "zbin/cmd/command", t = "zbin/cmd/trigger";
            tap.publish(c, "{\"cmd\":\"pause\",\"id\":\"a1\"}");
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("paused"), 1, 5000);
            tap.publish(t, "{\"seq\":1}");
            JsonNode paused = tap.await(m -> isDecision(m) && m.json().path("seq").asLong() == 1, 1, 5000).get(0).json();
            assertEquals("retest", paused.path("verdict").asText());
            assertEquals("line-paused", paused.path("reason").asText());
            tap.publish(c, "{\"cmd\":\"resume\"}");
            // (each part below presented as a handler does: again after a stale-trigger, which a stand-still of a loaded
            // machine as the trigger is taken up can give)
            JsonNode resumed = tap.present("cmd", 2, "{\"seq\":2,\"retest_of\":1}");
            assertEquals("J", resumed.path("grade").asText());
            assertEquals(0, resumed.path("attempt").asInt(), "a presentation the line did not measure does not count as an attempt");

            tap.publish(c, "{\"cmd\":\"recipe\",\"name\":\"resistor-prec-4k99\"}");
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("recipe").asText().equals("resistor-prec-4k99"), 1, 5000);
            rig.contacts.load(new PartModel.Resistor(4990, 0, 0), 0);
            JsonNode r = tap.present("cmd", 3, "{\"seq\":3}");
            assertEquals("resistor-prec-4k99", r.path("recipe").asText());
            assertEquals("Rs", r.path("param").asText());

            tap.publish(c, "{\"cmd\":\"recipe\",\"name\":\"no-such-recipe\",\"id\":\"r2\"}");
            tap.publish(c, "{\"cmd\":\"lot\",\"lot\":\"HG-9\",\"id\":\"l1\"}");
            tap.publish(c, "{\"cmd\":\"reset-counters\",\"id\":\"z1\"}");
            tap.publish(c, "{\"cmd\":\"launch\",\"id\":\"u1\"}");
            tap.publish(c, "not json");
            tap.publish(c, "{\"cmd\":\"pause\",\"id\":\"big\",\"pad\":\"" + "x".repeat(5000) + "\"}");
            // seven commands carry a cmd and get a result; "not json" and the oversize one get only a rejected notice
            List<Tap.Msg> results = tap.await(m -> m.topic().endsWith("/command/result"), 7, 5000);
            Map<String, JsonNode> byId = new HashMap<>();
            for (Tap.Msg m : results) byId.put(m.json().path("id").asText(), m.json());
            assertTrue(byId.get("a1").path("ok").asBoolean());
            assertFalse(byId.get("r2").path("ok").asBoolean());
            assertTrue(byId.get("l1").path("ok").asBoolean());
            assertTrue(byId.get("z1").path("ok").asBoolean());
            assertFalse(byId.get("u1").path("ok").asBoolean());
            tap.await(m -> m.topic().endsWith("/rejected") && m.json().path("topic").asText().equals(c), 3, 5000);
            tap.await(m -> m.topic().endsWith("/rejected") && m.json().path("topic").asText().equals(c)
                    && m.json().path("reason").asText().endsWith("bytes, limit 4096"), 1, 5000);
            assertTrue(tap.on("/command/result").stream().noneMatch(m -> m.json().path("id").asText().equals("big")),
                    "an oversize command is not carried out");
            JsonNode withLot = tap.present("cmd", 4, "{\"seq\":4}");
            assertEquals("HG-9", withLot.path("lot").asText());
        }
    }

    @Test
    void recordLogUnwritable_raisesAlarmAndPauses_thenRecoversWithNothingLost() throws Exception {
        Path blocker = dir.resolve("records-logfail");
        Files.writeString(blocker, "a file where the record folder should be");
        try (LineRig rig = new LineRig(dir, "logfail", broker(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker(), "zbin/logfail/#")) {
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            tap.publish("zbin/logfail/trigger", "{\"seq\":1}");
            JsonNode met = tap.await(m -> isDecision(m) && m.json().path("seq").asLong() == 1, 1, 5000).get(0).json();
            // (a stand-still of a loaded machine as the trigger is taken up can make it stale-trigger: then that answer's
            // row meets the failure, and the line pauses all the same)
            if (!met.path("reason").asText().equals("stale-trigger"))
                assertEquals("record-failed", met.path("reason").asText(), "the decision that met the failure gets no bin without its row");
            assertEquals("retest", met.path("verdict").asText());
            tap.await(m -> m.topic().endsWith("/alarm") && m.json().path("code").asText().equals("record-log-failed")
                    && m.json().path("active").asBoolean(), 1, 5000);
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("paused"), 1, 5000);
            tap.publish("zbin/logfail/trigger", "{\"seq\":2}");
            JsonNode d = tap.await(m -> isDecision(m) && m.json().path("seq").asLong() == 2, 1, 5000).get(0).json();
            assertEquals("line-paused", d.path("reason").asText(), "no sorting without a record");
            Files.delete(blocker);
            tap.await(m -> m.topic().endsWith("/alarm") && !m.json().path("active").asBoolean(), 1, 5000);
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 1, 5000);
            rig.close();
            long rows = Files.readAllLines(rig.recordFiles().get(0)).size() - 1;
            assertEquals(2, rows, "both decisions were recorded once the folder could be written");
        }
    }

    @Test
    void meterLinkDown_givesFaultModeAndLineFaultRetests_thenRecovers() throws Exception {
        try (LineRig rig = new LineRig(dir, "flt", broker(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker(), "zbin/flt/decision", "zbin/flt/state", "zbin/flt/alarm", "zbin/flt/command/result")) {
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            // (each part presented as a handler does: again after a stale-trigger, which a stand-still of a loaded machine can give)
            assertEquals("J", tap.present("flt", 1, "{\"seq\":1}").path("grade").asText());
            int port = rig.meterServer.port();
            rig.meterServer.close(); // the meter goes away
            JsonNode first = tap.present("flt", 2, "{\"seq\":2}");
            assertEquals("meter-disconnected", first.path("reason").asText());
            assertEquals("retest", first.path("verdict").asText());
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("fault"), 1, 5000);
            tap.await(m -> m.topic().endsWith("/alarm") && m.json().path("code").asText().equals("meter-link-down") && m.json().path("active").asBoolean(), 1, 5000);
            // acknowledged by MQTT command: it stays active, now with who and the note; a cleared or unknown one is refused
            tap.publish("zbin/flt/command", "{\"cmd\":\"acknowledge\",\"id\":\"k1\",\"alarm\":\"meter-link-down\",\"by\":\"shift-lead\",\"note\":\"meter on the bench\"}");
            assertTrue(tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("k1"), 1, 5000).get(0).json()
                    .path("ok").asBoolean());
            JsonNode acked = tap.await(m -> m.topic().endsWith("/alarm") && m.json().path("acknowledged").path("by").asText().equals("shift-lead"), 1, 5000)
                    .get(0).json();
            assertTrue(acked.path("active").asBoolean() && acked.path("acknowledged").path("note").asText().equals("meter on the bench"), acked.toString());
            tap.publish("zbin/flt/command", "{\"cmd\":\"acknowledge\",\"id\":\"k2\",\"alarm\":\"value-drift\",\"by\":\"shift-lead\"}");
            JsonNode notActive = tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("k2"), 1, 5000).get(0).json();
            assertTrue(!notActive.path("ok").asBoolean() && notActive.path("message").asText().contains("not active"), notActive.toString());
            tap.publish("zbin/flt/command", "{\"cmd\":\"acknowledge\",\"id\":\"k3\",\"alarm\":\"meter-link-down\"}");
            JsonNode noWho = tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("k3"), 1, 5000).get(0).json();
            assertTrue(!noWho.path("ok").asBoolean() && noWho.path("message").asText().contains("by"), noWho.toString());
            JsonNode next = tap.present("flt", 3, "{\"seq\":3,\"retest_of\":2}");
            assertEquals("line-fault", next.path("reason").asText(), "while faulted, parts are sent back without counting");
            assertEquals("retest", next.path("verdict").asText());
            try (net.zbin.sim.SimTcpServer back = new net.zbin.sim.SimTcpServer(rig.meter, port)) {
                long end = System.currentTimeMillis() + 10_000;
                long seq = 4;
                while (System.currentTimeMillis() < end) {
                    long s = seq++;
                    tap.publish("zbin/flt/trigger", "{\"seq\":" + s + "}");
                    JsonNode d = tap.await(m -> isDecision(m) && m.json().path("seq").asLong() == s, 1, 5000).get(0).json();
                    if (d.path("grade").asText().equals("J")) break;
                    Thread.sleep(100);
                }
                tap.awaitFrom(4, m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 1, 5000);
                tap.await(m -> m.topic().endsWith("/alarm") && !m.json().path("active").asBoolean(), 1, 5000);
            }
        }
    }
}
