package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Where the record log stands for a read-back checkpoint ({@link RecordLog#cut}), and reading the rows between two
 * such places back ({@link RecordLogReader#readRange}) — across a size rotation and a UTC day.
 */
class RecordLogCutTest {
    @TempDir
    Path dir;

    static List<Long> seqs(Path recs, RecordLog.Position from, RecordLog.Position to) throws Exception {
        List<Long> out = new ArrayList<>();
        RecordLogReader.readRange(recs, "l1", from, to, Instant.MAX, e -> out.add(e.decision().seq()));
        return out;
    }

    @Test
    void cuts_spanTheRepeatWindow_andTheRowsBetweenReadBackExactly_acrossFiles() throws Exception {
        Path recs = dir.resolve("r");
        Instant t0 = Instant.parse("2026-11-30T23:59:00Z");
        RecordLog.Cut early, late;
        // 2 000-byte files: rotation by size every few rows, then a new UTC day
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 0, 2_000, true), "l1", null)) {
            log.start();
            assertNull(log.cut(5_000), "nothing written yet");
            for (int i = 0; i < 30; i++) log.append(RecordLogTest.row(i, t0.plusMillis(i * 500L))); // 23:59:00.0 … 23:59:14.5
            early = log.cut(5_000);
            for (int i = 30; i < 150; i++) log.append(RecordLogTest.row(i, t0.plusMillis(i * 500L))); // … 00:00:14.5 of the next day
            late = log.cut(5_000);
        }
        assertNotNull(early);
        assertNotNull(late);
        assertEquals(t0.plusMillis(29 * 500L), early.lastRow());
        assertTrue(late.end().file().getFileName().toString().startsWith("l1-2026-12-01"), late.end().toString());
        // the rows from the early cut's end to the late one's: exactly those written between them, in order
        List<Long> between = seqs(recs, early.end(), late.end());
        assertEquals(120, between.size());
        for (int k = 0; k < between.size(); k++) assertEquals(30 + k, between.get(k));
        // the late cut's window: from the first row of the second 5 s before its last row (14.5 s → 9 s: seq 138) on
        List<Long> window = seqs(recs, late.from(), late.end());
        assertEquals(List.of(138L, 139L, 140L, 141L, 142L, 143L, 144L, 145L, 146L, 147L, 148L, 149L), window);
        // from a cut's end with no end: the rows after it to the log's end
        assertEquals(120, seqs(recs, early.end(), null).size());
    }

    @Test
    void aLogWhoseRowsDoNotReachBackTheWindow_cutsOnlyWhenTheRowsBeforeItAreOutsideIt() throws Exception {
        Path recs = dir.resolve("r");
        Instant t0 = Instant.parse("2026-11-30T10:00:00Z");
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 0, 1 << 20, true), "l1", null)) {
            log.start();
            log.priorLastRow(t0.minusSeconds(2)); // an earlier run wrote a row 2 s before this run's first
            for (int i = 0; i < 4; i++) log.append(RecordLogTest.row(i, t0.plusSeconds(i)));
            assertNull(log.cut(5_000), "the earlier run's row is in the window and its place in the file is not known here");
            log.append(RecordLogTest.row(4, t0.plusSeconds(10)));
            RecordLog.Cut c = log.cut(5_000);
            assertNotNull(c, "once the window is past the earlier run's rows");
            assertEquals(List.of(4L), seqs(recs, c.from(), c.end()));
        }
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 0, 1 << 20, true), "l1", null)) {
            log.start();
            log.priorLastRow(t0.minusSeconds(60)); // the earlier run's last row long before the window
            log.append(RecordLogTest.row(5, t0.plusSeconds(11)));
            RecordLog.Cut c = log.cut(5_000);
            assertNotNull(c);
            assertEquals(List.of(5L), seqs(recs, c.from(), c.end()));
            assertEquals(Files.size(c.end().file()), c.end().offset(), "the end is the file's end");
        }
    }
}
