package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.OutputStream;
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
 * The database's disk fills up under the historian (the server's data on a small tmpfs of its own, topped up with
 * ballast; the suite runs as root): the historian waits and retries, and once space is back — the server started again
 * if the full disk stopped it — the backlog drains: every row once.
 */
class HistorianDiskFullIT {
    static final int ROWS = 60_000;

    @TempDir
    Path dir;

    @Test
    void theDatabaseDiskFills_theHistorianWaits_andEveryRowArrivesOnceSpaceIsBack() throws Exception {
        try (PrivatePostgres pg = new PrivatePostgres("160m")) {
            pg.psql(Path.of("config/historian/roles.sql"));
            Path records = Files.createDirectories(dir.resolve("records"));
            StringBuilder b = new StringBuilder(String.join(",", RecordColumns.ALL)).append('\n');
            java.time.Instant t0 = java.time.Instant.parse("2026-12-01T08:00:00Z");
            for (int i = 0; i < ROWS; i++)
                b.append(HistorianIngestIT.row(t0.plusMillis(10L * i).toString(), "LOT-9", i, "P" + i, Double.toString(1 + i * 1e-6)));
            Files.writeString(records.resolve("hi-2026-12-01.csv"), b);
            Path cfg = dir.resolve("h.yaml");
            Files.writeString(cfg, "database: {url: '" + pg.url("zbin") + "', user: zbin_ingest, owner_user: zbin_owner}\n"
                    + "lines:\n  - {line: hi, records: records}\nbatch_rows: 2000\npoll_ms: 20\n");
            // the schema first, then the disk is topped up to a few megabytes short of full
            net.zbin.io.db.Schema.migrate(HistorianConfig.load(cfg).owner());
            Path ballast = pg.disk.resolve("ballast");
            try (OutputStream o = Files.newOutputStream(ballast)) {
                byte[] mb = new byte[1 << 20];
                while (pg.disk.toFile().getUsableSpace() > (6L << 20)) o.write(mb);
            }
            Historian h = new Historian(HistorianConfig.load(cfg), Clock.systemUTC());
            Thread t = HistorianIngestIT.inBackground(h);
            long end = System.nanoTime() + TimeUnit.MINUTES.toNanos(2);
            while (h.dbErrors.get() == 0 && System.nanoTime() < end) Thread.sleep(50);
            assertTrue(h.dbErrors.get() > 0, "the full disk refused the historian's writes");
            long before;
            try (Connection c = pg.connect("zbin", pg.admin)) {
                before = HistorianIT.count(c, "SELECT count(*) FROM decisions");
            } catch (java.sql.SQLException e) {
                before = -1; // the full disk stopped the server
            }
            Files.delete(ballast); // space is back
            try (Connection c = pg.revive("zbin", pg.admin)) {
                HistorianIngestIT.awaitCount(c, "SELECT count(*) FROM decisions", ROWS);
                h.close(); // stopped first: the counts below are final, so a row written twice would show in them
                t.join(10_000);
                assertTrue(!t.isAlive(), "the historian stopped");
                assertEquals(ROWS, HistorianIT.count(c, "SELECT count(*) FROM decisions"), "every row once");
                assertEquals(0, HistorianIT.count(c, "SELECT count(*) - count(DISTINCT source_line) FROM decisions"));
            }
            System.out.printf("disk full: %d database errors waited out, %d of %d rows stored when space ran out, all stored after%n",
                    h.dbErrors.get(), before, ROWS);
        }
    }
}
