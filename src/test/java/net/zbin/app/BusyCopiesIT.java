package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.TimeUnit;
import net.zbin.app.daemon.Daemon;
import net.zbin.io.LineConfig;
import net.zbin.io.LineConfigLoader;
import net.zbin.io.meter.ProfileMeterSession;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A handler that sends every trigger twice, back to back, into a line whose queue is full: through a real Mosquitto, the
 * copy of a trigger beyond the queue finds its original's {@code line-busy} claim, the copy of a queued one its original's
 * answer, and a copy beyond the queue of a presentation answered before finds that answer in the decision book: the two
 * messages of a presentation are answered alike, the copy as a repeat without a row.
 */
class BusyCopiesIT {
    /** Presentations in the flood, each sent twice: twice as many messages as the line's queue (10 000) holds and more. */
    private static final int PARTS = 6_000;
    /** A presentation measured before the line is held, whose copy comes while the queue is full. */
    private static final int ANSWERED = 100_000;

    @TempDir
    Path dir;

    @Test
    void everyTriggerSentTwiceIntoAFullQueue_bothAnsweredAlike_theCopyARepeatWithoutARow() throws Exception {
        SimMeter meter = LineRig.oneCapacitorMeter();
        try (MosquittoProcess broker = new MosquittoProcess(dir, "max_inflight_messages 0\nmax_queued_messages 200000\n");
             SimTcpServer server = new SimTcpServer(meter, 0)) {
            // a repeat window longer than the test, however slow the machine: a copy is a copy, not a new presentation
            Path cfgFile = TestLine.write(dir, "flood", broker.url(), server.port(), "handler: {repeat_window_ms: 600000}\n");
            // the first part's reading is held while the flood arrives: the profile's reading timeout must outlast it
            Path profile = dir.resolve("meters/zbin-sim.yaml");
            String text = Files.readString(profile);
            assertTrue(text.contains("timeout_ms: 1500"), "the shipped simulator profile's reading timeout, to be raised here");
            Files.writeString(profile, text.replace("timeout_ms: 1500", "timeout_ms: 600000"));
            LineConfig cfg = LineConfigLoader.load(cfgFile);
            Daemon daemon = new Daemon(cfg, ProfileMeterSession.open(cfg.meter(), Clock.systemUTC()), Clock.systemUTC());
            Map<Long, List<JsonNode>> answers = new TreeMap<>();
            int[] sent = {0};
            int presented; // the presentations of ANSWERED before the flood: more than one if it was answered stale-trigger
            try (Tap tap = new Tap(broker.url(), "zbin/flood/decision")) {
                daemon.start(30_000);
                // measured and answered before the line is held; a loaded machine can make the first trigger wait past the
                // deadline (stale-trigger), and then it is presented again, as a handler does (past the 50 ms in which the
                // line takes the same seq for a copy of the late answer's trigger)
                Tap.againWhileStale(() -> {
                    send(tap, ANSWERED);
                    int n = ++sent[0];
                    return tap.await(m -> seqOf(m) == ANSWERED, n, 180_000).get(n - 1).json();
                });
                presented = sent[0];
                meter.holdReadings();
                long readings = meter.measurements();
                send(tap, 0);
                long end = System.nanoTime() + TimeUnit.MINUTES.toNanos(3);
                while (meter.measurements() == readings) {
                    if (System.nanoTime() > end) throw new AssertionError("the first part's reading did not start within 3 minutes");
                    Thread.sleep(10);
                }
                for (int i = 1; i <= PARTS; i++) {
                    send(tap, i);
                    send(tap, i); // the handler's copy, right behind it
                }
                // The queue holds 10 000 messages at most while the first reading is held: at least the rest are
                // answered line-busy before anything is measured.
                tap.await(m -> m.json().path("reason").asText().equals("line-busy"), 2 * PARTS - 10_000, 180_000);
                // the queue is full and stays so while the reading is held: a copy of the presentation answered before it
                send(tap, ANSWERED);
                tap.await(m -> seqOf(m) == ANSWERED, presented + 1, 180_000);
                meter.releaseReadings();
                tap.await(m -> true, 2 * PARTS + 2 + presented, 180_000);
                for (Tap.Msg m : tap.msgs) answers.computeIfAbsent(seqOf(m), k -> new java.util.ArrayList<>()).add(m.json());
            } finally {
                meter.releaseReadings();
                daemon.close();
            }

            List<JsonNode> early = answers.get((long) ANSWERED);
            assertEquals(presented + 1, early.size(), early.toString());
            JsonNode measured = early.get(presented - 1), copy = early.get(presented);
            assertFalse(measured.path("repeat").asBoolean(), "measured before the line was held: " + early);
            assertTrue(measured.path("value").isNumber(), "measured before the line was held: " + early);
            assertTrue(copy.path("repeat").asBoolean(), "its copy, beyond the full queue, gets its answer again: " + early);
            for (String f : List.of("reason", "bin", "value", "grade"))
                assertEquals(measured.path(f), copy.path(f), "the copy's answer is the presentation's, " + f + ": " + early);
            List<JsonNode> first = answers.get(0L);
            assertEquals(1, first.size(), "the held part: one answer");
            assertFalse(first.get(0).path("repeat").asBoolean(), "the held part: measured, not a repeat");
            assertTrue(first.get(0).path("value").isNumber(), "the held part: graded from its reading once released: " + first.get(0));
            // Each presentation's two messages get one answer twice, the copy's a repeat; or — a copy that came 50 ms or more
            // after its original's line-busy answer went out is a new presentation, as a handler's deliberate one would be —
            // line-busy twice, neither a repeat. A copy of a queued trigger always came before its original's answer
            // (stale-trigger, the queue having waited on the meter; or a reading, on a machine that drained it in time).
            Map<String, Integer> byReason = new TreeMap<>();
            Map<Long, Long> fresh = new TreeMap<>();
            int busyCopiesRepeated = 0;
            List<String> wrong = new java.util.ArrayList<>();
            for (long seq = 1; seq <= PARTS; seq++) {
                List<JsonNode> a = answers.get(seq);
                if (a == null || a.size() != 2) {
                    wrong.add("seq " + seq + ": " + (a == null ? 0 : a.size()) + " answers for its two messages: " + a);
                    continue;
                }
                String reason = a.get(0).path("reason").asText();
                byReason.merge(reason, 1, Integer::sum);
                long repeats = a.stream().filter(j -> j.path("repeat").asBoolean()).count();
                fresh.put(seq, 2 - repeats);
                if (!reason.equals(a.get(1).path("reason").asText()) || a.get(0).path("bin").asInt() != a.get(1).path("bin").asInt())
                    wrong.add("seq " + seq + ": the copy did not get its original's answer: " + a);
                else if (repeats > 1 || (!reason.equals("line-busy") && repeats != 1))
                    wrong.add("seq " + seq + ": " + repeats + " answers marked a repeat: " + a);
                if (reason.equals("line-busy") && repeats == 1) busyCopiesRepeated++;
            }
            assertTrue(wrong.isEmpty(), wrong.size() + " of " + PARTS + " presentations answered wrongly (" + byReason + "), the first: "
                    + wrong.subList(0, Math.min(3, wrong.size())));
            System.out.println("presentations answered, by reason: " + byReason + "; line-busy ones whose copy was answered as a repeat: "
                    + busyCopiesRepeated);
            assertTrue(byReason.getOrDefault("line-busy", 0) >= (PARTS - 5_000), "presentations beyond the queue: " + byReason);
            assertTrue(byReason.getOrDefault("line-busy", 0) < PARTS, "presentations that waited in the queue: " + byReason);
            // The copy follows its original through Paho's thread microseconds later; the overflow thread has to wake, log
            // and publish before the copy counts as new. A copy beyond the full queue finds its original's claim and is
            // answered a repeat, in turn, not claimed again (which gave every such copy a row of its own).
            assertTrue(busyCopiesRepeated > 0, "no copy beyond the full queue was answered as a repeat of its original's line-busy");

            // the record log: one row per presentation, with its answer's reason; none for a copy
            Map<Long, List<String>> rows = new TreeMap<>();
            try (var files = Files.list(cfg.records().dir())) {
                for (Path f : files.sorted().toList()) {
                    try (var p = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get()
                            .parse(Files.newBufferedReader(f, StandardCharsets.UTF_8))) {
                        for (CSVRecord r : p) {
                            if (!r.get("lot").equals("TWICE")) continue;
                            rows.computeIfAbsent(Long.parseLong(r.get("seq")), k -> new java.util.ArrayList<>()).add(r.get("reason"));
                        }
                    }
                }
            }
            assertEquals(PARTS + 2, rows.size(), "a row for every presentation");
            assertEquals(presented, rows.get((long) ANSWERED).size(),
                    "a row for each answer to the presentation before the line was held (one, unless stale-trigger), none for its copy");
            for (long seq = 1; seq <= PARTS; seq++) {
                String reason = answers.get(seq).get(0).path("reason").asText();
                assertEquals(java.util.Collections.nCopies(fresh.get(seq).intValue(), reason), rows.get(seq),
                        "seq " + seq + ": a row for each answer not marked a repeat, none for a repeat: " + answers.get(seq));
            }
        }
    }

    private static void send(Tap tap, int seq) throws Exception {
        tap.publishWaiting("zbin/flood/trigger", "{\"seq\": " + seq + ", \"part\": \"T" + seq + "\", \"lot\": \"TWICE\"}");
    }

    private static long seqOf(Tap.Msg m) { return m.json().path("seq").asLong(); }
}
