package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.SQLException;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import net.zbin.sim.HandlerSim;
import net.zbin.sim.Scenario;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Three simulated lines (real daemons, handler simulators, one Mosquitto) write their record logs while the real
 * {@code zbin historian} process copies them into a PostgreSQL of the test's own — and the historian is killed -9 twice
 * and the database once, mid-run. At the end the database holds every row of every log once, the ingest role cannot
 * delete, and a replay from the database equals the replay of the file.
 */
class HistorianIT {
    @TempDir
    Path dir;

    Process historian(Path cfg, int n) throws Exception {
        return new ProcessBuilder("java", "-jar", Jar.path(), "historian", "--config", cfg.toString())
                .redirectErrorStream(true).redirectOutput(dir.resolve("historian-" + n + ".log").toFile()).start();
    }

    static long count(Connection c, String sql) throws SQLException {
        try (var s = c.createStatement(); var rs = s.executeQuery(sql)) {
            rs.next();
            return rs.getLong(1);
        }
    }

    /** Rows of a line's record files (every line but each file's header). */
    static long fileRows(Path records, String line) throws Exception {
        long n = 0;
        try (var s = Files.list(records)) {
            for (Path p : s.filter(f -> f.getFileName().toString().startsWith(line + "-")).toList()) n += Files.readAllLines(p).size() - 1;
        }
        return n;
    }

    @Test
    void threeLines_historianAndDatabaseKilled_everyRowOnce_insertOnlyRole_replayFromTheDatabaseEqualsTheFile() throws Exception {
        try (PrivatePostgres pg = new PrivatePostgres(); MosquittoProcess broker = new MosquittoProcess(dir, "")) {
            pg.psql(Path.of("config/historian/roles.sql"));
            List<String> lines = List.of("hx1", "hx2", "hx3");
            List<LineRig> rigs = new ArrayList<>();
            StringBuilder followed = new StringBuilder();
            for (String l : lines) {
                LineRig r = new LineRig(dir, l, broker.url(), LineRig.quietMeter(Scenario.builtIn()), "mlcc-x7r-100n", "");
                rigs.add(r);
                r.compensate();
                followed.append("  - {line: ").append(l).append(", records: records-").append(l).append(", state: state-").append(l).append("}\n");
            }
            Path cfg = dir.resolve("historian.yaml");
            Files.writeString(cfg, "database: {url: '" + pg.url("zbin") + "', user: zbin_ingest, owner_user: zbin_owner}\nlines:\n" + followed
                    + "batch_rows: 500\npoll_ms: 50\n");
            Process h = historian(cfg, 0);
            ExecutorService run = Executors.newFixedThreadPool(3);
            List<Future<HandlerSim.Summary>> runs = new ArrayList<>();
            for (LineRig r : rigs) runs.add(run.submit(() -> r.runHandler(4000, 250, 500, 0)));
            try (Connection admin = pg.connect("zbin", pg.admin)) {
                awaitRows(pg, 1000);
                h.destroyForcibly().waitFor(10, TimeUnit.SECONDS); // kill -9 mid-batch
                h = historian(cfg, 1);
                awaitRows(pg, 4000);
                pg.kill9(); // the database crashes under the historian
                Thread.sleep(1500);
                pg.start();
                awaitRows(pg, 7000);
                h.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
                h = historian(cfg, 2);
            }
            for (Future<HandlerSim.Summary> f : runs) assertEquals(0, f.get(5, TimeUnit.MINUTES).missing());
            run.shutdown();
            for (LineRig r : rigs) r.close();
            Map<String, Long> inFiles = new HashMap<>();
            long total = 0;
            for (String l : lines) {
                inFiles.put(l, fileRows(dir.resolve("records-" + l), l));
                total += inFiles.get(l);
            }
            awaitRows(pg, total);
            h.destroy(); // stopped first: the counts below are final, so a row written twice would show in them
            assertTrue(h.waitFor(30, TimeUnit.SECONDS));
            try (Connection c = pg.connect("zbin", pg.admin)) {
                for (String l : lines)
                    assertEquals(inFiles.get(l).longValue(), count(c, "SELECT count(*) FROM decisions WHERE line = '" + l + "'"), "line " + l + ": rows in the database = rows in its log");
                assertEquals(0, count(c, "SELECT count(*) - count(DISTINCT (line, source_file, source_line)) FROM decisions"), "no row twice");
                assertTrue(count(c, "SELECT count(*) FROM lots WHERE parts > 0") >= 3, "the lots view sees each line's lot");
                for (String l : lines) // each rig captured open and short once, through the daemon's command
                    assertEquals(2, count(c, "SELECT count(*) FROM compensation_captures WHERE line = '" + l + "'"), "captures of " + l);
                assertEquals(0, count(c, "SELECT count(*) FROM compensation_age_at_lot_start WHERE lot <> '' AND newest_capture_age IS NULL"),
                        "every lot started with a capture before it");
                System.out.printf("historian: %d rows of 3 lines, %d batches committed, historian killed -9 twice, PostgreSQL once%n", total,
                        count(c, "SELECT count(*) FROM ingest_batches"));
            }
            try (Connection ingest = pg.connect("zbin", "zbin_ingest"); var s = ingest.createStatement()) {
                SQLException refused = org.junit.jupiter.api.Assertions.assertThrows(SQLException.class, () -> s.executeUpdate("DELETE FROM decisions"));
                assertEquals("42501", refused.getSQLState(), "the ingest role may not delete: " + refused.getMessage());
            }
            // a replay from the database is the replay of the file
            Path file;
            try (var s = Files.list(dir.resolve("records-hx2"))) {
                file = s.sorted().findFirst().orElseThrow();
            }
            String lot;
            try (Connection c = pg.connect("zbin", pg.admin); var s = c.createStatement();
                 var rs = s.executeQuery("SELECT lot FROM decisions WHERE line = 'hx2' AND source_file = '" + file.getFileName() + "' LIMIT 1")) {
                rs.next();
                lot = rs.getString(1);
            }
            Path recipe = dir.resolve("recipes/mlcc-x7r-100n.yaml");
            Cli fromFile = Cli.run("replay", "--recipe", recipe.toString(), "--in", file.toString(), "--json");
            Cli fromDb = Cli.run("replay", "--recipe", recipe.toString(), "--db", pg.url("zbin"), "--db-user", "zbin_reader", "--line", "hx2",
                    "--lot", lot, "--json");
            assertEquals(0, fromDb.exit(), fromDb.err());
            assertEquals(fromFile.out(), fromDb.out(), "replay from the database = replay of the file");
            Cli tuneFile = Cli.run("tune", "--recipe", recipe.toString(), "--in", file.toString(), "--json", "--quiet", "--vary", "guard=0.2:0.6:0.2");
            Cli tuneDb = Cli.run("tune", "--recipe", recipe.toString(), "--db", pg.url("zbin"), "--db-user", "zbin_reader", "--line", "hx2",
                    "--lot", lot, "--json", "--quiet", "--vary", "guard=0.2:0.6:0.2");
            assertEquals(0, tuneDb.exit(), tuneDb.err());
            assertEquals(tuneFile.out(), tuneDb.out(), "tune from the database = tune of the file");
            // a shift (a time range) of the line, as well as a lot
            Cli shift = Cli.run("report", "--recipe", recipe.toString(), "--db", pg.url("zbin"), "--db-user", "zbin_reader", "--line", "hx2",
                    "--from", "2000-01-01T00:00:00Z", "--to", "2100-01-01T00:00:00Z", "--out", dir.resolve("shift.html").toString());
            assertEquals(0, shift.exit(), shift.err());
            assertTrue(shift.out().contains("quality record of line hx2:"), shift.out());

            // the lot's quality record, rendered in Chromium
            Path html = dir.resolve("record.html");
            Cli report = Cli.run("report", "--recipe", recipe.toString(), "--db", pg.url("zbin"), "--db-user", "zbin_reader", "--line", "hx2",
                    "--lot", lot, "--out", html.toString());
            assertEquals(0, report.exit(), report.err());
            String text = Files.readString(html);
            assertTrue(text.contains("Decisions as recorded") && text.contains("Cpk") && text.contains("in force at its start"), "record sections");
            assertTrue(!text.contains("http:") && !text.contains("https:") && !text.contains("src="), "self-contained");
            org.openqa.selenium.chrome.ChromeDriver browser = Chromium.open(dir.resolve("profile"), "1100,2400");
            try {
                browser.get(html.toUri().toString());
                var console = browser.manage().logs().get(org.openqa.selenium.logging.LogType.BROWSER).getAll();
                assertTrue(console.stream().noneMatch(e -> e.getLevel().intValue() >= java.util.logging.Level.WARNING.intValue()), "console: " + console);
                assertTrue(browser.findElements(org.openqa.selenium.By.tagName("svg")).size() >= 3, "plots rendered");
                Files.createDirectories(Path.of("target/historian-it"));
                Files.write(Path.of("target/historian-it/quality-record.png"), browser.getScreenshotAs(org.openqa.selenium.OutputType.BYTES));
            } finally {
                browser.quit();
            }
        }
    }

    static void awaitRows(PrivatePostgres pg, long n) throws Exception {
        long end = System.nanoTime() + TimeUnit.MINUTES.toNanos(3), got = -1;
        while (System.nanoTime() < end) {
            try (Connection c = pg.connect("zbin", pg.admin)) {
                got = count(c, "SELECT count(*) FROM decisions");
                if (got >= n) return;
            } catch (SQLException e) {
                // the database is starting, or the schema is not there yet
            }
            Thread.sleep(100);
        }
        throw new AssertionError("the database reached " + got + " of " + n + " rows within 3 minutes");
    }
}
