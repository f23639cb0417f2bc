package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.List;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.stream.Stream;
import net.zbin.core.CompensationSource;
import net.zbin.core.Decision;
import net.zbin.core.EquivalentModel;
import net.zbin.core.Grading;
import net.zbin.core.PrimaryParam;
import net.zbin.core.RecordedReading;
import net.zbin.core.Verdict;
import net.zbin.core.Impedance;
import net.zbin.core.Reason;
import net.zbin.core.Trigger;
import net.zbin.io.mqtt.Payloads;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class RecordLogTest {
    @TempDir
    Path dir;

    static Decision decision(long seq) {
        Grading g = new Grading(new Grading.Outcome(1, "J", Verdict.PASS, Reason.IN_GRADE),
                new Grading.Measurement(1000, new Impedance(1000, 16.0, -1591.5), 16.1, -1590.0, CompensationSource.USER),
                new Grading.Value(EquivalentModel.SERIES, PrimaryParam.CS, 1.0e-7, 0.5));
        return new Decision(seq, "P-" + seq, "LOT-1", Trigger.Kind.PART, "mlcc-x7r-100n", g, 1.25, false, 0);
    }

    static net.zbin.core.DecisionEvent row(long seq, Instant t) { return new net.zbin.core.DecisionEvent(t, "l1", decision(seq)); }

    /** The record-log columns as published in the README; new ones only ever come after these. */
    static final List<String> PUBLISHED = List.of("time", "line", "lot", "seq", "part", "kind", "recipe", "freq_hz",
            "r_ohm", "x_ohm", "raw_r_ohm", "raw_x_ohm", "model", "param", "value", "dev_pct", "d", "q", "esr_ohm",
            "theta_deg", "bin", "grade", "verdict", "reason", "latency_ms", "comp", "attempt");

    @Test
    void columns_areOnlyEverAppended() {
        assertEquals(PUBLISHED, RecordColumns.ALL.subList(0, PUBLISHED.size()));
    }

    @Test
    void aRow_reachesTheFileWhenAppended_beforeAnyFlushInterval() throws Exception {
        Path recs = dir.resolve("r");
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 60_000, 1 << 20, true), "l1", null)) {
            log.start();
            assertTrue(log.append(row(7, Instant.parse("2026-11-30T10:00:00Z"))));
            List<String> lines = Files.readAllLines(recs.resolve("l1-2026-11-30.csv"));
            assertEquals(2, lines.size(), "the row is with the operating system before its decision is published");
        }
    }

    @Test
    void rowsReadBack_asTheDecisionsTheyRecorded() throws Exception {
        Path recs = dir.resolve("r");
        Instant t = Instant.parse("2026-11-30T10:00:00Z");
        writeRows(recs, 5, t);
        List<net.zbin.core.DecisionEvent> back = new java.util.ArrayList<>();
        RecordLogReader.read(recs, "l1", t, back::add);
        assertEquals(5, back.size());
        for (int i = 0; i < 5; i++) {
            assertEquals(row(i, t), back.get(i));
            assertEquals(Payloads.text(Payloads.bytes(DecisionFields.json(decision(i)))),
                    Payloads.text(Payloads.bytes(DecisionFields.json(back.get(i).decision()))), "the same payload again");
        }
    }

    @Test
    void aRowThatCannotBeRead_isSkippedAndCounted_notSilentlyLost() throws Exception {
        Path recs = dir.resolve("r");
        Instant t = Instant.parse("2026-11-30T10:00:00Z");
        writeRows(recs, 3, t);
        Path f = recs.resolve("l1-2026-11-30.csv");
        List<String> lines = new java.util.ArrayList<>(Files.readAllLines(f));
        lines.set(2, lines.get(2).substring(0, lines.get(2).length() / 2)); // the second row cut short (a hand edit, a bad copy)
        Files.write(f, lines);
        List<net.zbin.core.DecisionEvent> back = new java.util.ArrayList<>();
        assertEquals(1, RecordLogReader.read(recs, "l1", t, back::add), "one row could not be read, and says so");
        assertEquals(List.of(row(0, t), row(2, t)), back);
    }

    @Test
    void awkwardDoubles_readBackAsTheSameBits() throws Exception {
        // shortest-repr edge cases of IEEE 754 binary64 (common practice: subnormal, largest finite, 17-digit values)
        double[] xs = {0.1 + 0.2, Double.MIN_VALUE, Double.MAX_VALUE, 1.2345678901234567e-300, -1591.4999999999998, 2.2250738585072014E-308};
        Path recs = dir.resolve("awkward");
        Instant t = Instant.parse("2026-11-30T10:00:00Z");
        List<net.zbin.core.DecisionEvent> written = new java.util.ArrayList<>();
        for (int i = 0; i < xs.length; i++) {
            double x = xs[i];
            Grading g = new Grading(new Grading.Outcome(1, "J", Verdict.PASS, Reason.IN_GRADE),
                    new Grading.Measurement(1000, new Impedance(1000, Math.abs(x), x), x, -x, CompensationSource.USER),
                    new Grading.Value(EquivalentModel.SERIES, PrimaryParam.CS, x, x));
            written.add(new net.zbin.core.DecisionEvent(t, "l1", new Decision(i, "P-" + i, "LOT-1", Trigger.Kind.PART, "mlcc-x7r-100n", g, x, false, 0)));
        }
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 0, 1 << 20, true), "l1", null)) {
            log.start();
            for (var e : written) log.append(e);
        }
        List<net.zbin.core.DecisionEvent> back = new java.util.ArrayList<>();
        assertEquals(0, RecordLogReader.read(recs, "l1", t, back::add));
        assertEquals(written, back);
    }

    /** Rows 0..n−1 of line l1 at t, through a log that is then closed. */
    static void writeRows(Path recs, int n, Instant t) {
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 0, 1 << 20, true), "l1", null)) {
            log.start();
            for (int i = 0; i < n; i++) log.append(row(i, t));
        }
    }

    static List<Path> files(Path d) throws Exception {
        try (Stream<Path> s = Files.list(d)) {
            return s.sorted().toList();
        }
    }

    @Test
    void rows_haveTheContractHeaderAndReadBackThroughReplay() throws Exception {
        Path recs = dir.resolve("r");
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 20, 1 << 20, true), "l1", null)) {
            log.start();
            for (int i = 0; i < 100; i++) log.append(row(i, Instant.parse("2026-11-30T10:00:00Z")));
        }
        Path f = recs.resolve("l1-2026-11-30.csv");
        List<String> lines = Files.readAllLines(f);
        assertEquals(String.join(",", RecordColumns.ALL), lines.get(0));
        assertEquals(101, lines.size());
        try (ReadingSource src = ReadingSource.open(f, b -> { throw new AssertionError(b.toString()); })) {
            int n = 0;
            RecordedReading r;
            while ((r = src.next()) != null) {
                assertEquals(16.0, r.rOhm());
                assertEquals(CompensationSource.USER, r.comp());
                n++;
            }
            assertEquals(100, n);
        }
    }

    @Test
    void tornLastLine_isCutOffWhenTheFileIsReopened() throws Exception {
        Path recs = dir.resolve("r");
        Instant t = Instant.parse("2026-11-30T10:00:00Z");
        writeRows(recs, 3, t);
        Path f = recs.resolve("l1-2026-11-30.csv");
        String whole = Files.readString(f);
        Files.writeString(f, whole + "2026-11-30T10:00:01Z,l1,LOT-1,3,P-3,part,mlcc-x7r-100n,1000.0,16"); // killed mid-row
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 0, 1 << 20, true), "l1", null)) {
            log.start();
            log.append(row(4, t));
        }
        List<String> lines = Files.readAllLines(f);
        assertEquals(5, lines.size(), "header + 3 rows + the new one; the torn row is gone");
        assertTrue(lines.get(4).contains(",4,P-4,"));
        assertTrue(lines.stream().noneMatch(l -> l.contains(",3,P-3,")));
    }

    @Test
    void files_rotateBySizeAndByUtcDay() throws Exception {
        Path recs = dir.resolve("r");
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 0, 2_000, true), "l1", null)) {
            log.start();
            for (int i = 0; i < 40; i++) {
                log.append(row(i, Instant.parse("2026-11-30T23:59:00Z")));
                Thread.sleep(2);
            }
            log.append(row(40, Instant.parse("2026-12-01T00:00:01Z")));
        }
        List<String> names = files(recs).stream().map(p -> p.getFileName().toString()).toList();
        assertTrue(names.contains("l1-2026-11-30.csv") && names.contains("l1-2026-11-30.1.csv"), names.toString());
        assertTrue(names.contains("l1-2026-12-01.csv"), names.toString());
        long rows = 0;
        for (Path p : files(recs)) rows += Files.readAllLines(p).size() - 1;
        assertEquals(41, rows, "every row in exactly one file");
    }

    @Test
    void unwritableFolder_isReported_rowsKept_andWrittenOnRecovery() throws Exception {
        Path recs = dir.resolve("r");
        Files.writeString(recs, "a file where the folder should be");
        AtomicInteger failed = new AtomicInteger(), recovered = new AtomicInteger();
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 10, 1 << 20, true), "l1", new RecordLog.Listener() {
            public void failed(String m) { failed.incrementAndGet(); }

            public void recovered() { recovered.incrementAndGet(); }
        })) {
            log.start();
            for (int i = 0; i < 10; i++) log.append(row(i, Instant.parse("2026-11-30T10:00:00Z")));
            long end = System.currentTimeMillis() + 5000;
            while (failed.get() == 0 && System.currentTimeMillis() < end) Thread.sleep(5);
            assertEquals(1, failed.get(), "reported once, not per retry");
            assertEquals(10, log.backlog());
            Files.delete(recs);
            end = System.currentTimeMillis() + 5000;
            while (recovered.get() == 0 && System.currentTimeMillis() < end) Thread.sleep(5);
            assertEquals(1, recovered.get());
        }
        assertEquals(11, Files.readAllLines(recs.resolve("l1-2026-11-30.csv")).size());
    }

    @Test
    void textASpreadsheetWouldEvaluate_isWrittenAsText_andReadsBackExactly() throws Exception {
        Path recs = dir.resolve("r");
        Instant t = Instant.parse("2026-11-30T10:00:00Z");
        // CSV injection (OWASP): cells starting with = + - @ tab or CR are formulas to a spreadsheet
        String[] parts = {"=HYPERLINK(\"http://x\",\"y\")", "+cmd|' /C calc'!A0", "-2+3", "@SUM(1)", "\tP", "'already quoted", "P-7"};
        List<net.zbin.core.DecisionEvent> written = new java.util.ArrayList<>();
        try (RecordLog log = new RecordLog(new LineConfig.RecordSettings(recs, 0, 1 << 20, true), "l1", null)) {
            log.start();
            for (int i = 0; i < parts.length; i++) {
                Decision d = decision(i);
                net.zbin.core.DecisionEvent e = new net.zbin.core.DecisionEvent(t, "l1", new Decision(d.seq(), parts[i], "=LOT" + i, d.kind(), d.recipe(),
                        d.grading(), d.latencyMs(), false, 0));
                written.add(e);
                assertTrue(log.append(e));
            }
        }
        String file = Files.readString(recs.resolve("l1-2026-11-30.csv"));
        for (String line : file.split("\n"))
            for (String cell : line.split(",")) {
                String c = cell.startsWith("\"") ? cell.substring(1) : cell;
                assertFalse(c.startsWith("=") || c.startsWith("+") || c.startsWith("@") || c.startsWith("\t"), "a formula cell: " + line);
            }
        List<net.zbin.core.DecisionEvent> back = new java.util.ArrayList<>();
        RecordLogReader.read(recs, "l1", t, back::add);
        assertEquals(written, back, "the exact original text");
    }
}
