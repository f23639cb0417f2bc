package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;

import com.fasterxml.jackson.databind.node.ObjectNode;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Instant;
import net.zbin.app.TestLine;
import net.zbin.core.Decision;
import net.zbin.core.DecisionEvent;
import net.zbin.core.Grader;
import net.zbin.core.Reason;
import net.zbin.core.Trigger;
import net.zbin.io.Json;
import net.zbin.io.LineConfig;
import net.zbin.io.LineConfigLoader;
import net.zbin.io.RecordLog;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** A read-back checkpoint is used only when it provably belongs to the record log as it is; otherwise the log is read in full. */
class ReadBackCheckpointTest {
    @TempDir
    Path dir;

    LineConfig cfg;
    MonitorListener monitor;
    Path file, data;

    @BeforeEach
    void written() throws Exception {
        cfg = LineConfigLoader.load(TestLine.write(dir, "ck", "tcp://127.0.0.1:1", 1, ""));
        Clock clock = Clock.systemUTC();
        LineSetup setup = new LineSetup(cfg);
        var topics = new net.zbin.io.mqtt.Topics(cfg.mqtt().topicRoot(), cfg.line());
        LineMode mode = new LineMode(clock, topics, true, () -> setup.recipe().name(), cfg.monitor().pauseOn(), null);
        monitor = new MonitorListener(cfg, mode, clock, setup.recipe());
        LineStats stats = new LineStats(clock, cfg.deadlineMs());
        RecordLog.Cut cut;
        try (RecordLog records = new RecordLog(cfg.records(), cfg.line(), null)) {
            records.start();
            Instant t0 = Instant.parse("2026-11-30T10:00:00Z");
            for (int i = 0; i < 50; i++) {
                var d = new Decision(i, "P" + i, "HG-7", Trigger.Kind.PART, setup.recipe().name(), Grader.notMeasured(setup.recipe(), Reason.LINE_PAUSED),
                        1.5, false, 1);
                var e = new DecisionEvent(t0.plusMillis(200L * i), cfg.line(), d);
                records.append(e);
                stats.decided(e);
                monitor.decided(e);
            }
            cut = records.cut(cfg.repeatWindowMs());
        }
        assertNotNull(cut);
        ReadBackCheckpoint.write(cfg.stateDir(), cfg.line(), new ReadBackCheckpoint.Taken(cut, "fp", "HG-7", stats.capture(), monitor.state()));
        file = ReadBackCheckpoint.file(cfg.stateDir(), cfg.line());
        data = cut.end().file();
    }

    ReadBackCheckpoint load(String fingerprint) {
        return ReadBackCheckpoint.load(cfg.stateDir(), cfg.line(), fingerprint, cfg.records().dir(), cfg.deadlineMs(), monitor::scratch);
    }

    @Test
    void aCheckpointOfTheLogAsItIs_isUsed() {
        ReadBackCheckpoint c = load("fp");
        assertNotNull(c);
        assertEquals(50, c.stats().decisions());
        assertEquals("HG-7", c.bookLot());
    }

    @Test
    void anotherRecipeOrSetting_isNotUsed() { assertNull(load("fp, but another recipe")); }

    @Test
    void aFieldMissing_isNotUsed_neverTakenAsZero() throws Exception {
        ObjectNode n = (ObjectNode) Json.mapper().readTree(file.toFile());
        ((ObjectNode) n.path("stats")).remove("decisions"); // a file of a version whose state had no such field
        Files.write(file, Json.mapper().writeValueAsBytes(n));
        assertNull(load("fp"));
    }

    @Test
    void anotherFormat_isNotUsed() throws Exception {
        ObjectNode n = (ObjectNode) Json.mapper().readTree(file.toFile());
        n.put("format", ReadBackCheckpoint.FORMAT + 1);
        Files.write(file, Json.mapper().writeValueAsBytes(n));
        assertNull(load("fp"));
    }

    @Test
    void aRecordFileCutShorter_orWithOtherBytes_isNotUsed() throws Exception {
        byte[] b = Files.readAllBytes(data);
        Files.write(data, java.util.Arrays.copyOf(b, b.length - 10)); // a power cut took the last rows
        assertNull(load("fp"));
        b[b.length - 20] = (byte) (b[b.length - 20] == '7' ? '8' : '7');
        Files.write(data, b); // as long as it was, other bytes: another file by that name
        assertNull(load("fp"));
    }

    @Test
    void aStateThisVersionCannotTakeUp_isNotUsed() throws Exception {
        ObjectNode n = (ObjectNode) Json.mapper().readTree(file.toFile());
        ((ObjectNode) n.path("monitor").path("monitor").path("window")).put("outcomes", "x");
        Files.write(file, Json.mapper().writeValueAsBytes(n));
        assertNull(load("fp"));
    }

    @Test
    void rowsAfterTheCheckpoint_leaveItUsable() throws Exception {
        Files.writeString(data, Files.readString(data) + Files.readAllLines(data).get(1) + "\n");
        assertNotNull(load("fp"));
    }
}
