package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.time.Clock;
import java.util.concurrent.TimeUnit;
import net.zbin.io.RecordColumns;
import net.zbin.io.db.HistorianConfig;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The historian's careful paths against a PostgreSQL of the test's own: text that the record log wrote
 * spreadsheet-safe is stored as it was meant, a row the database refuses is named and the rest are stored, a torn
 * last line waits for its end, and a file read again from the start (its positions lost) adds no row.
 */
class HistorianIngestIT {
    @TempDir
    Path dir;

    static String row(String time, String lot, long seq, String part, String r) {
        String[] cells = new String[RecordColumns.ALL.size()];
        java.util.Arrays.fill(cells, "");
        var cols = RecordColumns.ALL;
        cells[cols.indexOf("time")] = time;
        cells[cols.indexOf("line")] = "hi";
        cells[cols.indexOf("lot")] = lot;
        cells[cols.indexOf("seq")] = Long.toString(seq);
        cells[cols.indexOf("part")] = part;
        cells[cols.indexOf("kind")] = "part";
        cells[cols.indexOf("recipe")] = "mlcc-x7r-100n";
        cells[cols.indexOf("freq_hz")] = "1000.0";
        cells[cols.indexOf("r_ohm")] = r;
        cells[cols.indexOf("x_ohm")] = "-1591.5";
        cells[cols.indexOf("bin")] = "1";
        cells[cols.indexOf("grade")] = "J";
        cells[cols.indexOf("verdict")] = "pass";
        cells[cols.indexOf("reason")] = "in-grade";
        cells[cols.indexOf("attempt")] = "0";
        return String.join(",", cells) + "\n";
    }

    /** Runs the historian on a thread of its own until it is closed. */
    static Thread inBackground(Historian h) {
        Thread t = new Thread(() -> {
            try {
                h.run();
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }, "historian");
        t.start();
        return t;
    }

    static void awaitCount(Connection c, String sql, long n) throws Exception {
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(60), got = -1;
        while (System.nanoTime() < end) {
            try {
                got = HistorianIT.count(c, sql);
                if (got == n) return;
            } catch (java.sql.SQLException e) {
                // the historian has not made the schema yet
            }
            Thread.sleep(50);
        }
        throw new AssertionError(sql + ": " + got + ", expected " + n);
    }

    @Test
    void escapedText_refusedRow_tornLine_andAFileReadAgain() throws Exception {
        try (PrivatePostgres pg = new PrivatePostgres()) {
            pg.psql(Path.of("config/historian/roles.sql"));
            Path records = Files.createDirectories(dir.resolve("records"));
            Path f = records.resolve("hi-2026-12-01.csv");
            Files.writeString(f, String.join(",", RecordColumns.ALL) + "\n"
                    + row("2026-12-01T08:00:00.000000001Z", "'=LOT-7", 1, "'-P1", "1.5")   // written spreadsheet-safe: =LOT-7, -P1
                    + row("2026-12-01T08:00:01Z", "LOT-7", 2, "P2", "not-a-number")        // refused by the database, named in the log
                    + row("2026-12-01T08:00:02Z", "LOT-7", 3, "P3", "1.25")
                    + row("2026-12-01T08:00:03Z", "LOT-7", 4, "P4", "1.0").replace("\n", "")); // torn: no newline yet
            Path cfg = dir.resolve("h.yaml");
            Files.writeString(cfg, "database: {url: '" + pg.url("zbin") + "', user: zbin_ingest, owner_user: zbin_owner}\n"
                    + "lines:\n  - {line: hi, records: records}\npoll_ms: 20\n");
            Historian h = new Historian(HistorianConfig.load(cfg), Clock.systemUTC());
            HistorianMetrics metrics = HistorianMetrics.start(h, "127.0.0.1:0");
            Thread t = inBackground(h);
            try (Connection c = pg.connect("zbin", pg.admin)) {
                awaitCount(c, "SELECT count(*) FROM decisions", 2);
                // the historian's own status: rows stored and backlog per line
                String scraped = java.net.http.HttpClient.newHttpClient().send(java.net.http.HttpRequest.newBuilder(java.net.URI.create(metrics.url())).build(),
                        java.net.http.HttpResponse.BodyHandlers.ofString()).body();
                assertTrue(scraped.contains("zbin_historian_rows_stored_total{line=\"hi\"} 2.0") && scraped.contains("zbin_historian_backlog_bytes{line=\"hi\"}"),
                        scraped);
                metrics.close();
                assertEquals(1, HistorianIT.count(c, "SELECT count(*) FROM decisions WHERE lot = '=LOT-7' AND part = '-P1'"), "text stored as meant");
                assertEquals(1, h.figures.get("hi").refused.get(), "the bad row refused, the others stored");
                Files.writeString(f, "\n", java.nio.file.StandardOpenOption.APPEND); // the torn line completes
                awaitCount(c, "SELECT count(*) FROM decisions", 3);
                h.close();
                t.join(10_000);
                // the positions lost: the whole file is read again, and adds nothing
                try (var s = c.createStatement()) {
                    s.execute("DELETE FROM ingest_batches");
                }
                Historian again = new Historian(HistorianConfig.load(cfg), Clock.systemUTC());
                Thread t2 = inBackground(again);
                long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(60);
                while (again.figures.get("hi").already.get() < 3 && System.nanoTime() < end) Thread.sleep(50);
                again.close();
                t2.join(10_000);
                assertEquals(3, again.figures.get("hi").already.get(), "all three rows found already there");
                assertEquals(3, HistorianIT.count(c, "SELECT count(*) FROM decisions"), "no row twice");
                assertTrue(HistorianIT.count(c, "SELECT count(*) FROM decisions WHERE source_line = 4 AND r_ohm = 1.25") == 1, "source line kept");
            }
            // retention: a day's partition older than the limit is dropped whole, the others stay
            try (Connection owner = pg.connect("zbin", "zbin_owner")) {
                net.zbin.io.db.Partitions.ensure(owner, java.util.List.of(java.time.LocalDate.parse("2020-01-01")));
                assertEquals(java.util.List.of("decisions_20200101"), net.zbin.io.db.Partitions.dropBefore(owner, java.time.LocalDate.parse("2021-01-01")));
                assertEquals(3, HistorianIT.count(owner, "SELECT count(*) FROM decisions"), "the lot's day kept");
            }
            try (Connection ingest = pg.connect("zbin", "zbin_ingest"); var st = ingest.createStatement()) {
                java.sql.SQLException e = org.junit.jupiter.api.Assertions.assertThrows(java.sql.SQLException.class, () -> st.execute("DROP TABLE decisions_20261201"));
                assertEquals("42501", e.getSQLState(), "the ingest role cannot drop a day either: " + e.getMessage());
            }
        }
    }
}
