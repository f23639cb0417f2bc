package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.ArrayDeque;
import java.util.List;
import net.zbin.app.TestLine;
import net.zbin.core.Reading;
import net.zbin.core.TestConditions;
import net.zbin.io.Json;
import net.zbin.io.LineConfig;
import net.zbin.io.LineConfigLoader;
import net.zbin.io.RecordLog;
import net.zbin.core.FaultKind;
import net.zbin.io.meter.MeterException;
import net.zbin.io.meter.MeterReading;
import net.zbin.io.meter.MeterSession;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The trigger path without a broker: a scripted meter session, an in-memory publisher and a real record log in a
 * temp folder. The same path the daemon runs for every trigger (the real-broker tests keep the rest).
 */
class TriggerPathTest {
    @TempDir
    Path dir;

    static final double F = 1000, W = 2 * Math.PI * F;

    /** Replies in order; a queued exception is thrown in place of a reading. Counts what it was asked. */
    static final class ScriptedMeter implements MeterSession {
        final ArrayDeque<Object> script = new ArrayDeque<>();
        int measured, applied;

        ScriptedMeter reading(double devPct) {
            double c = 100e-9 * (1 + devPct / 100), x = -1 / (W * c);
            script.add(new Reading(F, 0.01 * Math.abs(x), x));
            return this;
        }

        public String identify() { return "scripted"; }

        public void apply(TestConditions conditions) { applied++; }

        public MeterReading measure() throws MeterException {
            measured++;
            Object next = script.poll();
            if (next == null) throw new AssertionError("the meter was asked for more readings than the test scripted");
            if (next instanceof MeterException e) throw e;
            return new MeterReading((Reading) next, 1);
        }

        public long reconnects() { return 0; }

        public long unaskedBytes() { return 0; }

        public void close() { }
    }

    ScriptedMeter meter;
    RecordingPublisher out;
    TriggerPath path;
    RecordLog records;
    LineConfig cfg;

    @BeforeEach
    void line() throws Exception {
        Path recipes = dir.resolve("recipes");
        Files.createDirectories(recipes);
        String text = Files.readString(Path.of("config/recipes/mlcc-x7r-100n-remeasure.yaml"));
        // a deadline no machine's class loading reaches: the test is about the path's logic, not its speed
        Path cfgFile = TestLine.write(dir, "tp", "tcp://127.0.0.1:1", 1, "handler: {deadline_ms: 600000, repeat_window_ms: 600000}\n");
        Files.writeString(cfgFile, Files.readString(cfgFile).replace("active: mlcc-x7r-100n", "active: mlcc-x7r-100n-remeasure"));
        Files.writeString(recipes.resolve("mlcc-x7r-100n-remeasure.yaml"), text);
        cfg = LineConfigLoader.load(cfgFile);
        Clock clock = Clock.systemUTC();
        var topics = new net.zbin.io.mqtt.Topics(cfg.mqtt().topicRoot(), cfg.line());
        LineSetup setup = new LineSetup(cfg);
        LineMode mode = new LineMode(clock, topics, true, () -> setup.recipe().name(), cfg.monitor().pauseOn(), null);
        LineStats stats = new LineStats(clock, cfg.deadlineMs());
        records = new RecordLog(cfg.records(), cfg.line(), null);
        records.start();
        meter = new ScriptedMeter();
        out = new RecordingPublisher();
        path = new TriggerPath(cfg, topics, setup, meter, out, records, mode, stats, new DecisionBook(cfg.repeatWindowMs(), 1000),
                List.of(stats, new MonitorListener(cfg, mode, clock, setup.recipe())), clock);
    }

    void trigger(String json) { path.onTrigger(json.getBytes(StandardCharsets.UTF_8), System.nanoTime()); }

    List<JsonNode> decisions() throws Exception {
        List<JsonNode> d = new java.util.ArrayList<>();
        for (var s : out.on("zbin/tp/decision")) d.add(Json.mapper().readTree(s.payload()));
        return d;
    }

    @Test
    void aPartFarFromTheLimits_isReadOnce_gradedAndRecorded() throws Exception {
        meter.reading(1.0);
        trigger("{\"seq\": 1, \"part\": \"P1\", \"lot\": \"L1\"}");
        JsonNode d = decisions().get(0);
        assertEquals("J", d.path("grade").asText());
        assertEquals(1, d.path("readings").asInt());
        assertEquals(1, meter.measured);
        records.close();
        List<String> rows = Files.readAllLines(Files.list(cfg.records().dir()).findFirst().orElseThrow());
        assertEquals(2, rows.size(), "a header and the decision's row: " + rows);
        assertTrue(rows.get(0).endsWith(",attempt,readings"), "the readings column is appended at the end: " + rows.get(0));
        assertTrue(rows.get(1).endsWith(",0,1"), rows.get(1));
    }

    @Test
    void aPartInAGuardZone_isReadAgain_andDecidedOnTheMean() throws Exception {
        // J accepts up to 4.685 % with one reading (U 0.3 %): 4.80 is re-read; the mean of 4.80, 4.70, 4.60 is 4.70 %,
        // inside J's 4.769 % for a mean of three (U(3) 0.2198 %)
        meter.reading(4.80).reading(4.70).reading(4.60);
        trigger("{\"seq\": 2, \"part\": \"P2\", \"lot\": \"L1\"}");
        JsonNode d = decisions().get(0);
        assertEquals(3, meter.measured);
        assertEquals(3, d.path("readings").asInt());
        assertEquals("J", d.path("grade").asText());
        assertEquals(4.70, d.path("dev_pct").asDouble(), 0.01);
    }

    @Test
    void aMeterFailureDuringReMeasurement_givesNoValue() throws Exception {
        meter.reading(4.80);
        meter.script.add(new MeterException(FaultKind.TIMEOUT, "TRIG:RX?", "", "no reply within 1500 ms"));
        trigger("{\"seq\": 3, \"part\": \"P3\", \"lot\": \"L1\"}");
        JsonNode d = decisions().get(0);
        assertEquals("retest", d.path("verdict").asText());
        assertEquals("meter-timeout", d.path("reason").asText());
        assertTrue(d.path("value").isNull() || d.path("value").isMissingNode(), "no value from a part whose reading did not finish: " + d);
    }

    @Test
    void aRepeatedTrigger_isAnsweredFromTheBook_withoutMeasuring() throws Exception {
        meter.reading(1.0);
        trigger("{\"seq\": 4, \"part\": \"P4\", \"lot\": \"L1\"}");
        trigger("{\"seq\": 4, \"part\": \"P4\", \"lot\": \"L1\"}");
        List<JsonNode> d = decisions();
        assertEquals(2, d.size());
        assertEquals(1, meter.measured, "the part was measured once");
        assertTrue(d.get(1).path("repeat").asBoolean());
        assertEquals(d.get(0).path("bin").asInt(), d.get(1).path("bin").asInt());
    }

    @Test
    void aMalformedTrigger_isRejected_andNothingIsMeasured() throws Exception {
        trigger("{\"seq\": \"five\"}");
        assertEquals(0, meter.measured);
        assertEquals(1, out.on("zbin/tp/rejected").size());
        assertTrue(decisions().isEmpty());
    }
}
