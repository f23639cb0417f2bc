package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
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
        final java.util.List<Double> appliedFreqs = new java.util.ArrayList<>();
        TestConditions now;
        /** Runs when conditions are set (a meter that takes its time to change them). */
        Runnable onApply = () -> { };

        ScriptedMeter reading(double devPct) {
            double c = 100e-9 * (1 + devPct / 100), x = -1 / (W * c);
            script.add(new Reading(F, 0.01 * Math.abs(x), x));
            return this;
        }

        public String identify() { return "scripted"; }

        public void apply(TestConditions conditions) {
            if (conditions.equals(now)) return; // as a real session: nothing sent while the conditions stay
            now = conditions;
            onApply.run();
            applied++;
            appliedFreqs.add(conditions.freqHz());
        }

        /** A polymer capacitor's reading at f: C, ESR and 2 nH ESL (no fixture). */
        ScriptedMeter part(double f, double c, double esr) {
            double w = 2 * Math.PI * f;
            script.add(new Reading(f, esr, w * 2e-9 - 1 / (w * c)));
            return this;
        }

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
    LineStats stats;

    @BeforeEach
    void line() throws Exception {
        line("mlcc-x7r-100n-remeasure", Files.readString(Path.of("config/recipes/mlcc-x7r-100n-remeasure.yaml")), "");
    }

    /** The path of a line whose active recipe is {@code text}, named {@code name}, with {@code extra} config keys. */
    void line(String name, String text, String extra) throws Exception {
        Path recipes = dir.resolve("recipes");
        Files.createDirectories(recipes);
        // a deadline no machine's class loading reaches: the test is about the path's logic, not its speed
        Path cfgFile = TestLine.write(dir, "tp", "tcp://127.0.0.1:1", 1, "handler: {deadline_ms: 600000, repeat_window_ms: 600000}\n" + extra);
        Files.writeString(cfgFile, Files.readString(cfgFile).replace("active: mlcc-x7r-100n", "active: " + name));
        Files.writeString(recipes.resolve(name + ".yaml"), text);
        cfg = LineConfigLoader.load(cfgFile);
        Clock clock = Clock.systemUTC();
        var topics = new net.zbin.io.mqtt.Topics(cfg.mqtt().topicRoot(), cfg.line());
        LineSetup setup = new LineSetup(cfg);
        LineMode mode = new LineMode(clock, topics, true, () -> setup.recipe().name(), cfg.monitor().pauseOn(), null);
        stats = new LineStats(clock, cfg.deadlineMs());
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
    void aLotChange_endsTheLotAfterTheNewLotsFirstAnswer_withTheFinishedLotsFigures() throws Exception {
        List<LineStats.Ended> ended = new java.util.ArrayList<>();
        List<Integer> answersWhenEnded = new java.util.ArrayList<>();
        path.onLotEnd(e -> {
            ended.add(e);
            answersWhenEnded.add(out.on("zbin/tp/decision").size());
        });
        for (int i = 1; i <= 3; i++) {
            meter.reading(1.0);
            trigger("{\"seq\": " + i + ", \"part\": \"A" + i + "\", \"lot\": \"LOT-A\"}");
        }
        assertTrue(ended.isEmpty(), "the first lot of a line ends nothing");
        meter.reading(1.0);
        trigger("{\"seq\": 1, \"part\": \"B1\", \"lot\": \"LOT-B\"}");
        assertEquals(1, ended.size());
        assertEquals(List.of(4), answersWhenEnded, "the lot ends after the new lot's first answer went out, not before it");
        LineStats.Snapshot finished = stats.snapshot(ended.get(0));
        assertEquals("LOT-A", finished.lot());
        assertEquals(3, finished.lotTally().parts());
        assertEquals(3, finished.decisions());
        LineStats.Snapshot now = stats.snapshot();
        assertEquals("LOT-B", now.lot());
        assertEquals(1, now.lotTally().parts(), "the new lot's first part counts in the new lot");
        assertEquals(4, now.total().parts());
        // seq 1 of the new lot is a new part, not a repeat of LOT-A's seq 1
        assertEquals("B1", decisions().get(3).path("part").asText());
        assertEquals(4, meter.measured);
    }

    @Test
    void aLotWhoseFirstTriggerFailedOnTheWay_stillStartsAndEnds_beforeTheNextLot() throws Exception {
        List<LineStats.Ended> ended = new java.util.ArrayList<>();
        path.onLotEnd(ended::add);
        meter.reading(1.0);
        trigger("{\"seq\": 1, \"part\": \"A1\", \"lot\": \"LOT-A\"}");
        // nothing scripted: the meter fails in a way the path does not handle, and LOT-B's first trigger gets no answer
        assertThrows(AssertionError.class, () -> trigger("{\"seq\": 1, \"part\": \"B1\", \"lot\": \"LOT-B\"}"));
        meter.reading(1.0);
        trigger("{\"seq\": 1, \"part\": \"C1\", \"lot\": \"LOT-C\"}");
        assertEquals(List.of("LOT-A", "LOT-B"), ended.stream().map(LineStats.Ended::lot).toList(), "both lots ended, in order");
        assertEquals(1, stats.snapshot(ended.get(0)).lotTally().parts(), "LOT-A's part stays LOT-A's");
        assertEquals(0, stats.snapshot(ended.get(1)).lotTally().parts(), "LOT-B decided nothing");
        assertEquals("LOT-C", stats.snapshot().lot());
        assertEquals(1, stats.snapshot().lotTally().parts());
    }

    @Test
    void aStaleTrigger_itsCopySentBeforeOrTakenUpJustAfterTheAnswer_getsTheSameAnswer_notAReading_oneSentLaterIsMeasured() throws Exception {
        String t = "{\"seq\": 7, \"part\": \"P7\", \"lot\": \"L1\"}";
        byte[] p = t.getBytes(StandardCharsets.UTF_8);
        long arrived = System.nanoTime() - (cfg.deadlineMs() + 100) * 1_000_000L; // waited past the handler's deadline
        long copyArrived = arrived + cfg.deadlineMs() * 1_000_000L; // the handler's patience ran out: its copy came before the answer
        path.onTrigger(p, arrived);
        path.onTrigger(p, copyArrived);
        List<JsonNode> d = decisions();
        assertEquals(2, d.size());
        assertEquals("stale-trigger", d.get(0).path("reason").asText());
        assertEquals("stale-trigger", d.get(1).path("reason").asText(), "the copy gets the answer the handler acts on: " + d.get(1));
        assertTrue(d.get(1).path("repeat").asBoolean(), d.get(1).toString());
        assertEquals(0, meter.measured, "nothing read for a part that may have moved");
        // taken up right after the answer went out: likely sent before it (the line was late), the same answer again
        trigger(t);
        assertEquals("stale-trigger", decisions().get(2).path("reason").asText());
        assertTrue(decisions().get(2).path("repeat").asBoolean(), decisions().get(2).toString());
        assertEquals(0, meter.measured);
        // presented again later than that (stamped as come a window after now: the book compares stamps): measured
        meter.reading(1.0);
        path.onTrigger(p, System.nanoTime() + DecisionBook.LATE_COPY_NANOS);
        assertEquals(1, meter.measured);
        assertEquals("J", decisions().get(3).path("grade").asText());
        records.close();
        List<String> rows = Files.readAllLines(Files.list(cfg.records().dir()).findFirst().orElseThrow());
        assertEquals(3, rows.size(), "a header, the stale answer's row and the measured one's (a repeat has none): " + rows);
    }

    @Test
    void aLineBusyTrigger_itsCopySentBeforeOrTakenUpJustAfterTheBusyAnswer_getsLineBusyAgain_notAReading_oneSentLaterIsMeasured() throws Exception {
        String t = "{\"seq\": 9, \"part\": \"P9\", \"lot\": \"L1\"}";
        byte[] p = t.getBytes(StandardCharsets.UTF_8);
        long arrived = System.nanoTime();
        Runnable busyAnswer = path.busy(p, arrived); // the queue was full: Paho's thread reduces it to its line-busy answer
        // the handler's patience ran out: its copy reached the measuring thread before the overflow thread answered
        path.onTrigger(p, arrived + 1_000);
        busyAnswer.run();
        // another copy that came before that answer went out, taken from the queue after it
        path.onTrigger(p, arrived + 2_000);
        List<JsonNode> d = decisions();
        assertEquals(3, d.size(), d.toString());
        for (JsonNode x : d) assertEquals("line-busy", x.path("reason").asText(), "every answer to the presentation says line-busy: " + d);
        assertTrue(d.get(0).path("repeat").asBoolean(), d.toString());
        assertTrue(!d.get(1).path("repeat").asBoolean(), "the overflow thread's own answer: " + d);
        assertTrue(d.get(2).path("repeat").asBoolean(), d.toString());
        assertEquals(0, meter.measured, "nothing read for a presentation the handler was told is not measured");
        // the same seq with another part is another presentation, measured
        meter.reading(1.0);
        path.onTrigger("{\"seq\": 9, \"part\": \"P9b\", \"lot\": \"L1\"}".getBytes(StandardCharsets.UTF_8), arrived + 3_000);
        assertEquals(1, meter.measured);
        // presented again after the line-busy answer went out: taken up at once, still a copy; later, measured
        meter.reading(1.0);
        trigger("{\"seq\": 10, \"part\": \"P10\", \"lot\": \"L1\"}");
        path.busy("{\"seq\": 11, \"part\": \"P11\", \"lot\": \"L1\"}".getBytes(StandardCharsets.UTF_8), System.nanoTime()).run();
        trigger("{\"seq\": 11, \"part\": \"P11\", \"lot\": \"L1\"}");
        assertEquals(2, meter.measured);
        assertTrue(decisions().get(decisions().size() - 1).path("repeat").asBoolean(), decisions().toString());
        meter.reading(1.0);
        // stamped as come a window after now (the claims compare stamps, not the clock)
        path.onTrigger("{\"seq\": 11, \"part\": \"P11\", \"lot\": \"L1\"}".getBytes(StandardCharsets.UTF_8),
                System.nanoTime() + DecisionBook.LATE_COPY_NANOS);
        assertEquals(3, meter.measured);
        assertEquals("J", decisions().get(decisions().size() - 1).path("grade").asText());
        records.close();
        List<String> rows = Files.readAllLines(Files.list(cfg.records().dir()).findFirst().orElseThrow());
        assertEquals(6, rows.size(), "a header, two line-busy rows and three measured ones (a repeat has none): " + rows);
    }

    @Test
    void aCopyBeyondTheFullQueueOfAPresentationAnsweredBefore_getsThatAnswerAgain_notLineBusy_noRow() throws Exception {
        meter.reading(1.0);
        trigger("{\"seq\": 31, \"part\": \"P31\", \"lot\": \"L1\"}");
        path.busy("{\"seq\": 31, \"part\": \"P31\", \"lot\": \"L1\"}".getBytes(StandardCharsets.UTF_8), System.nanoTime()).run();
        List<JsonNode> d = decisions();
        assertEquals(2, d.size(), d.toString());
        assertEquals("J", d.get(1).path("grade").asText(), "the measured answer again: " + d);
        assertTrue(d.get(1).path("repeat").asBoolean(), d.toString());
        assertEquals(1, meter.measured);
        // another part under the same seq is another presentation: beyond the full queue, line-busy
        path.busy("{\"seq\": 31, \"part\": \"P31b\", \"lot\": \"L1\"}".getBytes(StandardCharsets.UTF_8), System.nanoTime()).run();
        assertEquals("line-busy", decisions().get(2).path("reason").asText());
        assertTrue(!decisions().get(2).path("repeat").asBoolean(), decisions().toString());
        records.close();
        List<String> rows = Files.readAllLines(Files.list(cfg.records().dir()).findFirst().orElseThrow());
        assertEquals(3, rows.size(), "a header, the measured row and the other part's line-busy row: " + rows);
    }

    @Test
    void aCopyItselfBeyondTheFullQueue_getsItsOriginalsLineBusyAsARepeat_noSecondRow_oneSentLaterIsNew() throws Exception {
        byte[] p = "{\"seq\": 21, \"part\": \"P21\", \"lot\": \"L1\"}".getBytes(StandardCharsets.UTF_8);
        long arrived = System.nanoTime();
        Runnable original = path.busy(p, arrived);
        Runnable copy = path.busy(p, arrived + 1_000); // the queue still full when the handler's copy came
        original.run(); // the overflow thread answers in the order they came
        copy.run();
        List<JsonNode> d = decisions();
        assertEquals(2, d.size(), d.toString());
        for (JsonNode x : d) assertEquals("line-busy", x.path("reason").asText(), d.toString());
        assertTrue(!d.get(0).path("repeat").asBoolean(), "the original's own answer: " + d);
        assertTrue(d.get(1).path("repeat").asBoolean(), "the copy's is that answer again: " + d);
        // taken up just after that answer went out: still a copy (the line is late); later than the window after it, the
        // same trigger beyond the full queue is a new presentation: line-busy, a row of its own
        path.busy(p, System.nanoTime()).run();
        assertTrue(decisions().get(2).path("repeat").asBoolean(), decisions().toString());
        path.busy(p, System.nanoTime() + DecisionBook.LATE_COPY_NANOS).run(); // stamped a window after now
        assertTrue(!decisions().get(3).path("repeat").asBoolean(), decisions().toString());
        assertEquals(0, meter.measured);
        records.close();
        List<String> rows = Files.readAllLines(Files.list(cfg.records().dir()).findFirst().orElseThrow());
        assertEquals(3, rows.size(), "a header and a row for each presentation, none for the copy: " + rows);
    }

    @Test
    void aTriggerWhoseDeadlinePassesWhileTheMeterIsSet_isNotRead_andAnsweredStale() throws Exception {
        meter.reading(1.0);
        long margin = 1_000_000_000L;
        meter.onApply = () -> { // setting the conditions takes longer than the trigger had left (the scenario, not a wait)
            try {
                Thread.sleep(margin / 1_000_000 + 100);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        };
        long arrived = System.nanoTime() - (cfg.deadlineMs() * 1_000_000L - margin); // a second of its deadline left
        path.onTrigger("{\"seq\": 9, \"part\": \"P9\", \"lot\": \"L1\"}".getBytes(StandardCharsets.UTF_8), arrived);
        assertEquals(1, meter.applied, "in time when taken up: the meter was set");
        assertEquals(0, meter.measured, "past the deadline once set: no reading asked for");
        assertEquals("stale-trigger", decisions().get(0).path("reason").asText());
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
        assertTrue(rows.get(0).endsWith(",attempt,readings,steps"), "readings and steps are appended at the end: " + rows.get(0));
        assertTrue(rows.get(1).endsWith(",0,1,"), "one reading, no later steps: " + rows.get(1));
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
    void aHeldAck_goesRightAfterTheAnswersPublish_forAMeasuredPartAndARepeat() throws Exception {
        meter.reading(0.5);
        List<String> order = new java.util.ArrayList<>();
        path.onLotEnd(e -> order.add("lot-end"));
        byte[] t = "{\"seq\": 1, \"part\": \"A1\", \"lot\": \"L-1\"}".getBytes(StandardCharsets.UTF_8);
        for (int round = 0; round < 2; round++) { // measured, then answered from the book
            int before = out.sent.size();
            net.zbin.io.mqtt.Ack ack = net.zbin.io.mqtt.Ack.of(() -> order.add("ack after " + (out.sent.size() - before) + " publish"));
            path.onTrigger(t, System.nanoTime(), ack);
            assertTrue(ack.sent(), "round " + round + ": the held acknowledgement was sent");
        }
        assertEquals(List.of("ack after 1 publish", "ack after 1 publish"), order, "each right after its answer, once");
        assertEquals(2, decisions().size());
        assertTrue(decisions().get(1).path("repeat").asBoolean());
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

    /** The shipped two-step plan without its compensation requirement, on a fixture configured for milliohms. */
    void polymerLine() throws Exception {
        if (records != null) records.close();
        java.nio.file.Files.walk(dir).sorted(java.util.Comparator.reverseOrder()).filter(p -> !p.equals(dir)).forEach(p -> p.toFile().delete());
        String text = Files.readString(Path.of("config/recipes/polymer-cap-100u-esr.yaml")).replace("required: true", "required: false");
        line("polymer-cap-100u-esr", text, "fixture: {short_max_ohm: 0.0005, short_check_ohm: 0.0002}\n");
    }

    @Test
    void aTwoStepPlan_setsTheMeterForEachStep_recordsTheStepsReading_andReplaysToTheSameBin() throws Exception {
        polymerLine();
        meter.part(120, 100e-6, 0.05).part(100e3, 100e-6, 0.012);
        trigger("{\"seq\": 1, \"part\": \"N1\", \"lot\": \"L1\"}");
        meter.part(120, 100e-6, 0.05).part(100e3, 100e-6, 0.040);
        trigger("{\"seq\": 2, \"part\": \"N2\", \"lot\": \"L1\"}");
        List<JsonNode> d = decisions();
        assertEquals(List.of(120.0, 100e3, 120.0, 100e3), meter.appliedFreqs, "the value step's conditions, then the ESR step's, per part");
        assertEquals("M", d.get(0).path("grade").asText(), d.get(0).toString());
        assertEquals(0.012, d.get(0).path("steps").get(0).path("r_ohm").asDouble(), 1e-9, "the step's reading is in the decision");
        assertEquals("esr-high", d.get(1).path("reason").asText());
        assertEquals(9, d.get(1).path("bin").asInt());
        records.close();
        Path log = Files.list(cfg.records().dir()).findFirst().orElseThrow();
        List<String> rows = Files.readAllLines(log);
        assertTrue(rows.get(0).endsWith(",readings,steps"), rows.get(0));
        var engine = cfg.engine(net.zbin.io.RecipeLoader.load(dir.resolve("recipes/polymer-cap-100u-esr.yaml")).withFixture(cfg.bounds()));
        List<String> replayed = new java.util.ArrayList<>();
        try (var src = net.zbin.io.ReadingSource.open(log, b -> { throw new AssertionError(b.toString()); })) {
            net.zbin.core.RecordedReading r;
            while ((r = src.next()) != null) replayed.add(engine.regrade(r).grading().bin() + " " + engine.regrade(r).grading().reason().code());
        }
        assertEquals(List.of("1 in-grade", "9 esr-high"), replayed, "the log replays to the live bins");
    }

    @Test
    void aPartTheValueStepRejects_isNotReadAtTheLaterStep() throws Exception {
        polymerLine();
        meter.part(120, 130e-6, 0.05); // +30 %: out of M
        trigger("{\"seq\": 3, \"part\": \"N3\", \"lot\": \"L1\"}");
        assertEquals(1, meter.measured);
        assertEquals("value-high", decisions().get(0).path("reason").asText());
    }
}
