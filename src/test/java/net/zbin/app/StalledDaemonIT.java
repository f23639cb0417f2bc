package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.CleanupMode;
import org.junit.jupiter.api.io.TempDir;

/**
 * The real {@code zbin run} process made to stand still (SIGSTOP) while a trigger waits on its connection, longer than the
 * handler's deadline, then let go (SIGCONT) — as a machine that stops a process (swapping, a host that takes the virtual
 * CPU away, a long collection) does. The trigger was never taken up in time: another part may be on the contacts by now,
 * so it is answered without a reading; the handler's copy of it, sent while the process stood still, gets that answer
 * again as a repeat (taken up before the answer went out, or within the 50 ms after it that counts as before: either
 * way no second reading and no second row).
 */
class StalledDaemonIT {
    private static final String LINE = "still";
    /** The handler's deadline in this test's line, ms. */
    private static final int DEADLINE_MS = 150;

    /** Kept when the test fails: the daemon's log is in it. */
    @TempDir(cleanup = CleanupMode.ON_SUCCESS)
    Path dir;

    final StartedProcesses started = new StartedProcesses();

    @AfterEach
    void stopAll() throws InterruptedException { started.stopAll(); }

    @Test
    void aTriggerThatWaitedWhileTheProcessStoodStill_isAnsweredWithoutAReading() throws Exception {
        SimMeter meter = LineRig.oneCapacitorMeter();
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             SimTcpServer sim = new SimTcpServer(meter, 0);
             Tap tap = new Tap(broker.url(), "zbin/" + LINE + "/decision", "zbin/" + LINE + "/state")) {
            Path cfg = TestLine.write(dir, LINE, broker.url(), sim.port(),
                    "handler: {deadline_ms: " + DEADLINE_MS + ", repeat_window_ms: 600000}\n");
            Process daemon = started.add(new ProcessBuilder("java", "-jar", Jar.path(), "run", "--config", cfg.toString())
                    .redirectErrorStream(true).redirectOutput(dir.resolve("daemon.log").toFile()).start());
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("online").asBoolean(), 1, 60_000);

            // presented as a handler does: again while the answer is stale-trigger, which a loaded machine can give the first part
            JsonNode first = tap.present(LINE, 1);
            assertTrue(first.path("value").isNumber(), "a part on a running line is measured: " + first);

            signal(daemon, "STOP");
            awaitStopped(daemon);
            int mark = tap.msgs.size();
            trigger(tap, 2);
            // The scenario: the process stands still three deadlines long with the trigger on its connection (not a wait
            // for something to happen: nothing can, the process is stopped), and the handler's copy of it behind it, sent
            // when its patience ran out.
            Thread.sleep(DEADLINE_MS);
            trigger(tap, 2);
            Thread.sleep(2L * DEADLINE_MS);
            signal(daemon, "CONT");

            List<JsonNode> answers = tap.awaitFrom(mark, m -> m.topic().endsWith("/decision") && m.json().path("seq").asLong() == 2, 2, 30_000)
                    .stream().map(Tap.Msg::json).toList();
            List<JsonNode> firsts = answers.stream().filter(x -> !x.path("repeat").asBoolean()).toList();
            assertEquals(1, firsts.size(), "one answer as the presentation's, the other a repeat: " + answers);
            JsonNode a = firsts.get(0), copy = answers.stream().filter(x -> x.path("repeat").asBoolean()).findFirst().orElseThrow();
            assertEquals("stale-trigger", copy.path("reason").asText(), "the copy gets the presentation's answer again: " + copy);
            assertFalse(copy.path("value").isNumber(), "no reading for the copy: " + copy);
            assertEquals("stale-trigger", a.path("reason").asText(), "it waited past the deadline, unseen: not measured: " + a);
            assertEquals("retest", a.path("verdict").asText(), a.toString());
            assertFalse(a.path("value").isNumber(), "no reading: " + a);
            assertTrue(a.path("latency_ms").asDouble() >= DEADLINE_MS, "its wait counts the time the process stood still: " + a);

            // The line goes on: a new presentation is measured (the first ones straight after the stand-still may still
            // count it in their wait; bounded, by count).
            boolean measured = false;
            for (int seq = 3; seq < 60 && !measured; seq++) measured = answer(tap, seq).path("value").isNumber();
            assertTrue(measured, "a part presented after the stand-still is measured");
            long answersOfTwo = tap.msgs.stream().skip(mark).filter(m -> m.topic().endsWith("/decision") && m.json().path("seq").asLong() == 2).count();
            assertEquals(2, answersOfTwo, "two answers for the presentation and its copy, no more");

            daemon.destroy();
            assertTrue(daemon.waitFor(30, TimeUnit.SECONDS), "clean stop");
            int rowsOfTwo = 0;
            try (var files = Files.list(dir.resolve("records-" + LINE))) {
                for (Path p : files.sorted().toList()) {
                    try (var csv = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(Files.newBufferedReader(p))) {
                        for (CSVRecord r : csv) {
                            if (!r.get("seq").equals("2")) continue;
                            rowsOfTwo++;
                            assertEquals("stale-trigger", r.get("reason"), "the row of the presentation that waited: " + r);
                        }
                    }
                }
            }
            assertEquals(1, rowsOfTwo, "one row for the presentation");
            String log = Files.readString(dir.resolve("daemon.log"));
            assertTrue(log.contains("the process stood still for"), "the stand-still is logged: " + log);
            log.lines().filter(l -> l.contains("stood still")).forEach(l -> System.out.println("StalledDaemonIT: " + l));
        }
    }

    private static void trigger(Tap tap, long seq) throws Exception {
        tap.publishAcknowledged("zbin/" + LINE + "/trigger", "{\"seq\": " + seq + ", \"part\": \"ST-" + seq + "\", \"lot\": \"ST-LOT-1\"}");
    }

    /** Presents {@code seq} and returns its answer. */
    private static JsonNode answer(Tap tap, long seq) throws Exception {
        int from = tap.msgs.size();
        trigger(tap, seq);
        return tap.awaitFrom(from, m -> m.topic().endsWith("/decision") && m.json().path("seq").asLong() == seq, 1, 30_000).get(0).json();
    }

    /**
     * Waits (10 s at most) until every thread of {@code p} is stopped. {@code kill} returns once the signal is sent, not
     * once the process stands still: one of its threads must run to take the signal and stop the others, and on a busy
     * machine it may wait for a CPU while the others go on — in one suite run the daemon answered the trigger sent right
     * after {@code kill -STOP} returned, measured, and stood still only after.
     */
    private static void awaitStopped(Process p) throws Exception {
        Path tasks = Path.of("/proc", Long.toString(p.pid()), "task");
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(10);
        while (true) {
            boolean all = true;
            try (var ts = Files.list(tasks)) {
                for (Path t : ts.toList()) {
                    try {
                        String stat = Files.readString(t.resolve("stat"));
                        // the state is the field after the command name, which is in parentheses and may hold spaces
                        char state = stat.charAt(stat.lastIndexOf(')') + 2);
                        if ("TtZX".indexOf(state) < 0) all = false; // stopped, or a thread on its way out
                    } catch (java.nio.file.NoSuchFileException gone) {
                        // a thread that ended meanwhile stands still enough
                    }
                }
            }
            if (all) return;
            if (System.nanoTime() > end) throw new AssertionError("the daemon did not stand still within 10 s of kill -STOP");
            Thread.sleep(1);
        }
    }

    /** Sends the process a signal by name ({@code STOP}, {@code CONT}) with the system's {@code kill}. */
    private static void signal(Process p, String name) throws Exception {
        Process k = new ProcessBuilder("kill", "-" + name, Long.toString(p.pid())).inheritIO().start();
        assertTrue(k.waitFor(10, TimeUnit.SECONDS) && k.exitValue() == 0, "kill -" + name);
    }
}
