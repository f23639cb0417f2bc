package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The record folder fails under a running line: a small file system of its own (a tmpfs the test mounts; the suite
 * runs as root) fills up while a handler re-presents every retest at once, or the folder goes away and the real
 * process is killed -9. No value bin without its row, the rows kept meanwhile stay bounded, and the line is back
 * soon after space returns.
 */
class RecordFolderFailuresIT {
    @TempDir
    Path dir;

    static void run(String... cmd) throws IOException, InterruptedException {
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes());
        assertTrue(p.waitFor(30, TimeUnit.SECONDS) && p.exitValue() == 0, String.join(" ", cmd) + ": " + out);
    }

    /** Writes until the file system says it is full. */
    static void fill(Path f) throws IOException {
        byte[] block = new byte[4096];
        try (OutputStream o = Files.newOutputStream(f)) {
            while (true) o.write(block);
        } catch (IOException full) {
            // no space left: what we wanted
        }
    }

    @Test
    void aFullDisk_withAHandlerThatRePresentsAtOnce_noValueBinWithoutItsRow_boundedBacklog_andTheLineComesBack() throws Exception {
        Path records = Files.createDirectories(dir.resolve("records-full"));
        run("mount", "-t", "tmpfs", "-o", "size=2m", "tmpfs", records.toString());
        try (MosquittoProcess broker = new MosquittoProcess(dir, "max_inflight_messages 0\n"); // takes a burst whole
             LineRig rig = new LineRig(dir, "full", broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
             Tap tap = new Tap(broker.url(), "zbin/full/decision", "zbin/full/state")) {
            rig.contacts.load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
            Path filler = records.resolve("filler.bin");
            long seq = 0;
            JsonNode d = present(tap, ++seq, -1);
            assertEquals("pass", d.path("verdict").asText(), "writable at first");
            fill(filler);
            // the file's last page may still hold a few rows; the part whose row meets the full disk gets no bin
            for (int i = 0; i < 200 && !d.path("reason").asText().equals("record-failed"); i++) {
                d = present(tap, ++seq, -1);
                assertTrue(d.path("reason").asText().equals("in-grade") || d.path("reason").asText().equals("record-failed"), d.toString());
            }
            assertEquals("record-failed", d.path("reason").asText(), "a row that cannot be written gives no bin");
            // a handler that re-presents at once: 3 000 presentations as fast as the broker takes them
            int mark = tap.msgs.size();
            for (int i = 0; i < 3000; i++) tap.publishWaiting("zbin/full/trigger", "{\"seq\":" + (++seq) + ",\"part\":\"F" + seq + "\"}");
            List<Tap.Msg> whileFull = tap.awaitFrom(mark, m -> m.topic().endsWith("/decision"), 3000, 60_000);
            long paused = whileFull.stream().filter(m -> m.json().path("reason").asText().equals("line-paused")).count();
            // (a row small enough for the last page's slack can still be written now and then: the line may resume
            // for a moment, and every value decision it then gives has its row — checked below)
            assertTrue(paused >= 2000, "the line paused while the disk was full: " + paused + " of 3000");
            assertTrue(rig.daemon.recordBacklogBytes() <= net.zbin.io.RecordLog.MAX_UNMEASURED_BYTES + 1024,
                    "answers that measured nothing are kept within their byte bound: " + rig.daemon.recordBacklogBytes());
            assertTrue(rig.daemon.recordsDropped() > 0, "beyond the bound they are dropped and counted");
            Files.delete(filler);
            long freed = System.nanoTime(), backMs;
            while (true) {
                d = present(tap, ++seq, d.path("verdict").asText().equals("retest") ? seq - 1 : -1);
                if (d.path("verdict").asText().equals("pass")) {
                    backMs = (System.nanoTime() - freed) / 1_000_000;
                    break;
                }
                assertTrue(System.nanoTime() - freed < TimeUnit.SECONDS.toNanos(30), "the line never came back");
            }
            System.out.printf("disk full: %d line-paused answers while full (%d rows dropped beyond the bound), line back %d ms after space "
                    + "returned%n", paused, rig.daemon.recordsDropped(), backMs);
            rig.close();
            // every value decision the handler got has its row, with the same bin
            Map<Long, JsonNode> published = new HashMap<>();
            for (Tap.Msg m : tap.on("/decision"))
                if (!m.json().path("verdict").asText().equals("retest")) published.put(m.json().path("seq").asLong(), m.json());
            Map<Long, Integer> rows = new HashMap<>();
            for (Path f : rig.recordFiles()) {
                if (!f.toString().endsWith(".csv")) continue;
                try (var p = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(Files.newBufferedReader(f))) {
                    for (CSVRecord r : p) rows.put(Long.parseLong(r.get("seq")), Integer.parseInt(r.get("bin")));
                }
            }
            for (JsonNode v : published.values())
                assertEquals(v.path("bin").asInt(), rows.get(v.path("seq").asLong()), "seq " + v.path("seq") + " has its row");
            assertTrue(published.size() >= 2);
        } finally {
            run("umount", "-l", records.toString());
        }
    }

    @Test
    void aRecordFolderThatCannotBeWrittenMidRun_thenKillNine_noValueDecisionWithoutItsRow() throws Exception {
        net.zbin.sim.SimMeter meter = new net.zbin.sim.SimMeter(new net.zbin.sim.Contacts(), net.zbin.sim.Fixture.IDEAL,
                java.time.Clock.systemUTC(), 5, 0, net.zbin.sim.SimMeter.RandomFaults.NONE);
        meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        Process daemon = null;
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             net.zbin.sim.SimTcpServer sim = new net.zbin.sim.SimTcpServer(meter, 0);
             Tap tap = new Tap(broker.url(), "zbin/ro/decision", "zbin/ro/state")) {
            Path cfg = TestLine.write(dir, "ro", broker.url(), sim.port(), "");
            // small files: the log opens a new one every twenty-odd rows
            Files.writeString(cfg, Files.readString(cfg).replace("flush_ms: 50}", "flush_ms: 50, rotate_mb: 0.005}"));
            daemon = new ProcessBuilder("java", "-jar", Jar.path(), "run", "--config", cfg.toString())
                    .redirectErrorStream(true).redirectOutput(dir.resolve("ro.log").toFile()).start();
            tap.await(m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 1, 30_000);
            long seq = 0;
            for (int i = 0; i < 50; i++) presentOn(tap, "ro", ++seq);
            // the folder goes away under the daemon and a file takes its place: the open file still takes rows, the
            // next one cannot be made (as with a folder turned read-only or a volume gone)
            Path records = dir.resolve("records-ro"), moved = dir.resolve("records-ro-moved");
            Files.move(records, moved);
            Files.writeString(records, "not a folder");
            boolean failed = false;
            for (int i = 0; i < 100; i++) {
                JsonNode d = presentOn(tap, "ro", ++seq);
                failed |= d.path("reason").asText().equals("record-failed");
            }
            assertTrue(failed, "the log met the failure within 100 parts (files rotate every ~20 rows)");
            daemon.destroyForcibly().waitFor(10, TimeUnit.SECONDS); // kill -9 with rows kept only in memory
            Map<Long, Integer> rows = new HashMap<>();
            try (var files = Files.list(moved)) {
                for (Path f : files.filter(p -> p.toString().endsWith(".csv")).toList())
                    try (var p = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(Files.newBufferedReader(f))) {
                        for (CSVRecord r : p) rows.put(Long.parseLong(r.get("seq")), Integer.parseInt(r.get("bin")));
                    }
            }
            int values = 0;
            for (Tap.Msg m : tap.on("/decision")) {
                JsonNode d = m.json();
                if (d.path("verdict").asText().equals("retest")) continue;
                values++;
                assertEquals(d.path("bin").asInt(), rows.get(d.path("seq").asLong()), "value decision seq " + d.path("seq") + " has its row");
            }
            System.out.printf("record folder lost + kill -9: %d value decisions published, each with its row%n", values);
            assertTrue(values >= 50);
        } finally {
            if (daemon != null) daemon.destroyForcibly();
        }
    }

    /** One presentation on {@code line}, again after a stale-trigger answer ({@link Tap#present}). */
    static JsonNode presentOn(Tap tap, String line, long seq) throws Exception {
        return tap.present(line, seq, "{\"seq\":" + seq + ",\"part\":\"R" + seq + "\"}");
    }

    /** One presentation on the full disk's line, again after a stale-trigger answer ({@link Tap#present}). */
    static JsonNode present(Tap tap, long seq, long retestOf) throws Exception {
        return tap.present("full", seq, "{\"seq\":" + seq + ",\"part\":\"F" + (retestOf < 0 ? seq : retestOf) + "\""
                + (retestOf < 0 ? "" : ",\"retest_of\":" + retestOf) + "}");
    }
}
