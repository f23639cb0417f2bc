package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import net.zbin.sim.SimFault;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The live line gives a part a bin only for a reading that is provably its own: a meter that sends a stray line,
 * refuses a setting, or a trigger that waited past the deadline never yields a value bin (embedded Moquette).
 */
class NoBinWithoutProofIT {
    static EmbeddedBroker broker;

    @TempDir
    Path dir;

    @BeforeAll
    static void up() throws Exception { broker = new EmbeddedBroker(Files.createTempDirectory("moquette")); }

    @AfterAll
    static void down() { broker.close(); }

    static boolean decision(Tap.Msg m, long seq) { return m.topic().endsWith("/decision") && m.json().path("seq").asLong() == seq; }

    @Test
    void aMeterThatSendsStrayLines_neverPassesAPartOnOpenContacts() throws Exception {
        try (LineRig rig = new LineRig(dir, "stray", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker.url(), "zbin/stray/decision", "zbin/stray/state")) {
            awaitReady(tap);
            PartModel good = new PartModel.Capacitor(100e-9, 0.02, 0, 0.01);
            int openPassed = 0, openSeen = 0, goodPassed = 0;
            java.util.Map<String, Integer> goodNotPassed = new java.util.TreeMap<>();
            for (long seq = 1; seq <= 300; seq++) {
                boolean open = seq % 2 == 0;
                if (open) rig.contacts.open();
                else rig.contacts.load(good, 0);
                // every fifth good part, the meter repeats its reading as an extra line: without proof of pairing
                // the next query (the open part's) would read it
                if (!open && seq % 10 == 1) rig.meter.inject(SimFault.STRAY, 1);
                // presented as a handler does: again after a stale-trigger (a loaded machine), so the count below does
                // not depend on the machine's speed
                JsonNode d = tap.present("stray", seq);
                if (open) {
                    openSeen++;
                    if (d.path("verdict").asText().equals("pass")) openPassed++;
                } else if (d.path("verdict").asText().equals("pass")) goodPassed++;
                else goodNotPassed.merge(d.path("reason").asText(), 1, Integer::sum);
            }
            assertEquals(150, openSeen);
            assertEquals(0, openPassed, "a part on open contacts never gets a value bin from the previous part's reading");
            assertTrue(goodPassed >= 120, "good parts still pass (a stray line costs a retest): " + goodPassed + "; the others' reasons: " + goodNotPassed);
        }
    }

    @Test
    void aRefusedFrequency_givesNoValueBin_faultStateAndACriticalAlarm_andCapturesAreRefused() throws Exception {
        try (LineRig rig = new LineRig(dir, "refuse", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker.url(), "zbin/refuse/#")) {
            awaitReady(tap);
            Path recipes = rig.cfg.recipeDir();
            Files.writeString(recipes.resolve("c0g-at-100m.yaml"), Files.readString(recipes.resolve("mlcc-c0g-100p.yaml"))
                    .replace("recipe: mlcc-c0g-100p", "recipe: c0g-at-100m").replace("freq: 1M", "freq: 100M")
                    .replace("required: true", "required: false"));
            rig.contacts.load(new PartModel.Capacitor(100e-12, 0.0005, 0, 0), 0);
            String cmd = "zbin/refuse/command";
            tap.publish(cmd, "{\"cmd\":\"recipe\",\"name\":\"c0g-at-100m\",\"id\":\"r\"}");
            tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("r"), 1, 10_000);
            // presented as a handler does: again after a stale-trigger (a stand-still of a loaded machine just before
            // a trigger is taken up makes it stale), so the first answer that measured is the one checked
            JsonNode first = null;
            for (long seq = 1; seq <= 20; seq++) {
                JsonNode d = tap.present("refuse", seq, "{\"seq\":" + seq + ",\"part\":\"C" + seq + "\"" + (seq > 1 ? ",\"retest_of\":" + (seq - 1) : "") + "}");
                if (first == null) first = d;
            }
            for (Tap.Msg m : tap.on("/decision")) {
                JsonNode d = m.json();
                assertFalse(d.path("verdict").asText().equals("pass"), "no value bin at a frequency the meter refused: " + d);
                assertTrue(d.path("value").isNull(), "no value from a reading at other conditions: " + d);
            }
            assertEquals("setup-refused", first.path("reason").asText(), first.toString());
            assertEquals("retest", first.path("verdict").asText());
            JsonNode alarm = tap.await(m -> m.topic().endsWith("/alarm") && m.json().path("code").asText().equals("meter-setup-refused")
                    && m.json().path("active").asBoolean(), 1, 10_000).get(0).json();
            assertEquals("critical", alarm.path("severity").asText());
            assertTrue(alarm.path("message").asText().contains("CONF:FREQ 100000000") && alarm.path("message").asText().contains("-222"),
                    "the alarm names the setting and the meter's words: " + alarm);
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("fault"), 1, 10_000);
            assertEquals(1000, rig.meter.freqHz(), "the meter went on at its old frequency");

            rig.contacts.open();
            tap.publish(cmd, "{\"cmd\":\"compensate\",\"kind\":\"open\",\"id\":\"c\"}");
            JsonNode cap = tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("c"), 1, 10_000).get(0).json();
            assertFalse(cap.path("ok").asBoolean(), "no open taken at 1 kHz is stored as the 100 MHz entry: " + cap);
            assertFalse(Files.exists(rig.cfg.stateDir().resolve("compensation.yaml"))
                    && Files.readString(rig.cfg.stateDir().resolve("compensation.yaml")).contains("100000000"), "nothing stored at 100 MHz");

            tap.publish(cmd, "{\"cmd\":\"recipe\",\"name\":\"mlcc-x7r-100n\",\"id\":\"back\"}");
            tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("back"), 1, 10_000);
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            assertEquals("J", tap.present("refuse", 100, "{\"seq\":100,\"part\":\"X100\"}").path("grade").asText());
            tap.await(m -> m.topic().endsWith("/alarm") && m.json().path("code").asText().equals("meter-setup-refused")
                    && !m.json().path("active").asBoolean(), 1, 10_000);
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 1, 10_000);
        }
    }

    @Test
    void aTriggerThatWaitedBehindAStalledReading_isAnsweredStale_thoughThatReadingRanOnTheMqttThread() throws Exception {
        // An idle line measures a part on the MQTT client's callback thread; a trigger that comes meanwhile waits there,
        // unseen. When that reading stalls (the meter answers only after the profile's 1.5 s timeout), the trigger behind
        // it has waited past the 150 ms deadline and must not be measured: another part may be on the contacts by now.
        // (Where the machine is too slow for a part within 1 ms, parts go through the queue, stamped at once: the same
        // answer is due. With the backdated stamp taken out of Dispatch.arrival, this fails on a warm line.)
        try (LineRig rig = new LineRig(dir, "stall", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker.url(), "zbin/stall/decision", "zbin/stall/state")) {
            awaitReady(tap);
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            for (long seq = 1; seq <= 500; seq++) { // one answer before the next, the line idle between: warm, parts go on the MQTT thread
                long s = seq;
                tap.publish("zbin/stall/trigger", "{\"seq\":" + s + "}");
                tap.await(m -> decision(m, s), 1, 10_000);
            }
            rig.meter.inject(SimFault.SLOW, 1);
            tap.publish("zbin/stall/trigger", "{\"seq\":10000}");
            tap.publish("zbin/stall/trigger", "{\"seq\":10001}");
            // a handler that misbehaves a little: it sends 10001 again at once, long before the line can answer it
            tap.publish("zbin/stall/trigger", "{\"seq\":10001}");
            JsonNode stalled = tap.await(m -> decision(m, 10_000), 1, 30_000).get(0).json();
            List<Tap.Msg> both = tap.await(m -> decision(m, 10_001), 2, 30_000);
            JsonNode behind = both.get(0).json(), copy = both.get(1).json();
            // the copy came before the stale answer went out: it gets that answer again, never a reading of whatever is
            // on the contacts by then (measured, it would be a second, contradicting answer and a row the handler ignores)
            assertEquals("stale-trigger", copy.path("reason").asText(), "the copy gets the answer the handler acts on: " + copy);
            assertTrue(copy.path("repeat").asBoolean(), "answered from the book: " + copy);
            long rows;
            try (var files = Files.list(rig.cfg.records().dir())) {
                rows = 0;
                for (Path f : files.filter(f -> f.toString().endsWith(".csv")).toList())
                    try (var lines = Files.lines(f)) {
                        rows += lines.filter(l -> l.contains(",10001,")).count();
                    }
            }
            assertEquals(1, rows, "one row for the presentation: the stale answer's");
            assertEquals("retest", stalled.path("verdict").asText(), "the stalled reading gives no bin: " + stalled);
            assertEquals("stale-trigger", behind.path("reason").asText(), "the trigger behind it waited past the deadline: " + behind);
            assertTrue(behind.path("value").isNull(), "not measured: " + behind);
            assertTrue(behind.path("latency_ms").asDouble() > rig.cfg.deadlineMs(), "its wait counts the stall: " + behind);
        }
    }

    @Test
    void aBurstOfTwentyThousandTriggers_noneMeasuredAfterTheDeadline_theOldOnesAnsweredStale() throws Exception {
        // 20 000 triggers at once: seconds of work, far more than a 50 ms deadline can hold. Through Mosquitto (the
        // embedded broker drops QoS 1 messages in a flood this size).
        try (MosquittoProcess mosquitto = new MosquittoProcess(dir, "max_inflight_messages 0\n");
             LineRig rig = new LineRig(dir, "burst", mosquitto.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n",
                "handler: {deadline_ms: 50}\n");
             Tap tap = new Tap(mosquitto.url(), "zbin/burst/decision", "zbin/burst/dashboard")) {
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            for (int seq = 0; seq < 20_000; seq++) tap.publishWaiting("zbin/burst/trigger", "{\"seq\":" + seq + "}");
            List<Tap.Msg> all = tap.await(m -> m.topic().endsWith("/decision"), 20_000, 120_000);
            Map<String, Integer> reasons = new HashMap<>();
            int measuredLate = 0;
            double deadline = rig.cfg.deadlineMs();
            for (Tap.Msg m : all) {
                String reason = m.json().path("reason").asText();
                reasons.merge(reason, 1, Integer::sum);
                boolean measured = !reason.equals("stale-trigger") && !reason.equals("line-busy");
                // a measured decision's latency is its age when the measurement started plus the measurement (the
                // simulator takes no time): one that started past the deadline shows seconds here under this burst
                if (measured && m.json().path("latency_ms").asDouble() > deadline + 1000) measuredLate++;
            }
            assertEquals(0, measuredLate, "no trigger measured after its deadline: " + reasons);
            assertTrue(reasons.getOrDefault("stale-trigger", 0) > 1000, "the old ones answered without measuring: " + reasons);
            assertTrue(reasons.getOrDefault("in-grade", 0) > 0, "the fresh ones measured: " + reasons);
            int stale = reasons.get("stale-trigger");
            tap.await(m -> m.topic().endsWith("/dashboard") && m.json().path("retest_reasons").path("stale-trigger").asLong() == stale,
                    1, 10_000); // counted on the dashboard
        }
    }

    @Test
    void aRecipeBoundAlarm_clearsWhenTheRecipeChanges_andAfterACaptureTheNewRecipeRaisesNothingStale() throws Exception {
        try (LineRig rig = new LineRig(dir, "ralarm", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-c0g-100p", "");
             Tap tap = new Tap(broker.url(), "zbin/ralarm/#")) {
            awaitReady(tap);
            // the C0G recipe needs compensation and none is stored: raised at start
            tap.await(m -> m.topic().endsWith("/dashboard") && m.json().path("alarms").toString().contains("compensation-missing"), 1, 10_000);
            tap.publish("zbin/ralarm/command", "{\"cmd\":\"recipe\",\"name\":\"mlcc-x7r-100n\",\"id\":\"x\"}");
            tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals("x"), 1, 10_000);
            tap.await(m -> m.topic().endsWith("/alarm") && m.json().path("code").asText().equals("compensation-missing")
                    && !m.json().path("active").asBoolean(), 1, 10_000);
            rig.compensate();
            int seen = tap.msgs.size();
            tap.awaitFrom(seen + 1, m -> m.topic().endsWith("/dashboard"), 1, 20_000);
            JsonNode dash = tap.on("/dashboard").get(tap.on("/dashboard").size() - 1).json();
            assertEquals("[]", dash.path("alarms").toString(), "no alarm of another recipe on the line: " + dash.path("alarms"));
            assertEquals(0, dash.path("monitor").path("alarms").size(), "the monitor agrees: " + dash.path("monitor").path("alarms"));
        }
    }

    /**
     * The line's ready state, as a handler waits for it: the daemon publishes it after its subscribe on the same
     * connection, so from then on a trigger from another client is heard (start() returning only means requested).
     */
    static void awaitReady(Tap tap) throws InterruptedException {
        tap.await(m -> m.topic().endsWith("/state") && m.json().path("online").asBoolean() && m.json().path("mode").asText().equals("ready"), 1, 30_000);
    }
}
