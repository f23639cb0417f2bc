package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.time.Clock;
import java.util.concurrent.TimeUnit;
import net.zbin.io.Json;
import net.zbin.sim.Contacts;
import net.zbin.sim.PartModel;
import net.zbin.sim.SimMeter;
import net.zbin.sim.SimTcpServer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The real {@code zbin run}, killed -9 and started again three ways over the same record log: from a checkpoint taken
 * before a lot command, a reset-counters and 130 more parts (the rows after it read back), from none (the whole log
 * read back), and from the last checkpoint (no row after it; the repeat window's rows re-read for the book). The three
 * show the same figures, monitor and alarms, and a redelivered trigger is a repeat after each.
 */
class ReadBackCheckpointIT {
    @TempDir(cleanup = org.junit.jupiter.api.io.CleanupMode.ON_SUCCESS)
    Path dir;

    static final String LINE = "ckpt";

    Process start(Path cfg, String log) throws Exception {
        return new ProcessBuilder("java", "-DZBIN_LOG_LEVEL=INFO", "-jar", Jar.path(), "run", "--config", cfg.toString())
                .redirectErrorStream(true).redirectOutput(dir.resolve(log).toFile()).start();
    }

    void command(Tap tap, String json, String id) throws Exception {
        tap.publish("zbin/" + LINE + "/command", json);
        tap.await(m -> m.topic().endsWith("/command/result") && m.json().path("id").asText().equals(id), 1, 10_000);
    }

    /** Waits until the checkpoint holds every row of the log (its offset at the end of its file). */
    JsonNode checkpointOfEveryRow() throws Exception {
        Path f = dir.resolve("state-" + LINE + "/readback-" + LINE + ".json");
        long until = System.nanoTime() + 30_000_000_000L;
        while (System.nanoTime() < until) {
            if (Files.exists(f)) {
                JsonNode c = Json.mapper().readTree(f.toFile());
                Path data = dir.resolve("records-" + LINE).resolve(c.path("file").asText());
                if (Files.exists(data) && Files.size(data) == c.path("offset").asLong()) return c;
            }
            Thread.sleep(50);
        }
        throw new AssertionError("no checkpoint of every row within 30 s");
    }

    /** Starts, waits for ready and the first dashboard after it; returns that dashboard without what depends on the moment. */
    ObjectNode restart(Tap tap, Path cfg, String log, Process[] slot) throws Exception {
        int mark = tap.msgs.size();
        slot[0] = start(cfg, log);
        tap.awaitAfter(mark, m -> m.topic().endsWith("/state") && m.json().path("mode").asText().equals("ready"), 60_000);
        int ready = tap.msgs.size();
        ObjectNode d = (ObjectNode) tap.awaitAfter(ready, m -> m.topic().endsWith("/dashboard"), 20_000).json().deepCopy();
        // the moment, and the repeats (the line's state file keeps them, not the checkpoint; the test answers repeats between starts)
        for (String k : new String[] {"at", "uph", "active_alarms", "repeats"}) d.remove(k);
        ((ObjectNode) d.path("monitor")).remove("comp_age_h");
        return d;
    }

    static String log(Path f) throws Exception { return Files.readString(f); }

    @Test
    void aRestartFromACheckpoint_showsWhatAFullReadBackShows() throws Exception {
        SimMeter meter = new SimMeter(new Contacts(), net.zbin.sim.Fixture.IDEAL, Clock.systemUTC(), 9, 0, SimMeter.RandomFaults.NONE);
        meter.contacts().load(new PartModel.Capacitor(100e-9, 0.02, 0, 0.01), 0);
        Process[] daemon = new Process[1];
        Path ck = dir.resolve("state-" + LINE + "/readback-" + LINE + ".json");
        try (MosquittoProcess broker = new MosquittoProcess(dir, "");
             SimTcpServer sim = new SimTcpServer(meter, 0);
             Tap tap = new Tap(broker.url(), "zbin/" + LINE + "/#")) {
            Path cfg = TestLine.write(dir, LINE, broker.url(), sim.port(), "dashboard: {interval_s: 0.3}\n"); // repeat window: default 5 s
            restart(tap, cfg, "d0.log", daemon);
            for (long s = 1; s <= 100; s++) tap.present(LINE, s);
            JsonNode early = checkpointOfEveryRow();
            Files.copy(ck, dir.resolve("early.json"));
            command(tap, "{\"cmd\":\"lot\",\"lot\":\"LOT-A\",\"id\":\"a\"}", "a");
            for (long s = 101; s <= 200; s++) tap.present(LINE, s);
            command(tap, "{\"cmd\":\"reset-counters\",\"id\":\"z\"}", "z");
            java.util.Map<Long, JsonNode> told = new java.util.HashMap<>();
            for (long s = 201; s <= 230; s++) told.put(s, tap.present(LINE, s));
            JsonNode last = checkpointOfEveryRow();
            assertTrue(last.path("offset").asLong() > early.path("offset").asLong() || !last.path("file").equals(early.path("file")));
            Files.copy(ck, dir.resolve("last.json"));
            daemon[0].destroyForcibly().waitFor(10, TimeUnit.SECONDS); // kill -9

            Files.copy(dir.resolve("early.json"), ck, StandardCopyOption.REPLACE_EXISTING);
            ObjectNode fromEarly = restart(tap, cfg, "d1.log", daemon);
            assertTrue(log(dir.resolve("d1.log")).contains("(the checkpoint as of"),
                    "the early checkpoint was used: " + log(dir.resolve("d1.log")));
            assertTrue(tap.present(LINE, 230).path("repeat").asBoolean(), "the last part is a repeat after a restart from the early checkpoint");
            daemon[0].destroyForcibly().waitFor(10, TimeUnit.SECONDS);

            Files.delete(ck);
            ObjectNode full = restart(tap, cfg, "d2.log", daemon);
            assertTrue(log(dir.resolve("d2.log")).contains("(the whole log"), "read back in full: " + log(dir.resolve("d2.log")));
            assertTrue(tap.present(LINE, 230).path("repeat").asBoolean(), "the last part is a repeat after a full read-back");
            daemon[0].destroyForcibly().waitFor(10, TimeUnit.SECONDS);

            Files.copy(dir.resolve("last.json"), ck, StandardCopyOption.REPLACE_EXISTING);
            ObjectNode fromLast = restart(tap, cfg, "d3.log", daemon);
            assertTrue(log(dir.resolve("d3.log")).contains("(the checkpoint as of"), "the last checkpoint was used: " + log(dir.resolve("d3.log")));
            for (long s = 221; s <= 230; s++) {
                JsonNode again = tap.present(LINE, s);
                assertTrue(again.path("repeat").asBoolean(), "seq " + s + " answered from the book after a restart from the last checkpoint: " + again);
                assertEquals(told.get(s).path("bin").asInt(), again.path("bin").asInt());
            }

            assertEquals("LOT-A", full.path("lot").asText());
            assertEquals(30, full.path("parts").asLong(), "the lot's figures count from the reset");
            assertEquals(full, fromEarly, "from the early checkpoint and the rows after it as from the whole log");
            assertEquals(full, fromLast, "from the last checkpoint as from the whole log");
        } finally {
            if (daemon[0] != null) {
                daemon[0].destroy();
                daemon[0].waitFor(20, TimeUnit.SECONDS);
            }
        }
    }
}
