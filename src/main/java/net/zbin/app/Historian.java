package net.zbin.app;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.SQLException;
import java.time.Clock;
import java.time.Instant;
import java.time.LocalDate;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicLong;
import net.zbin.io.RecordColumns;
import net.zbin.io.db.Db;
import net.zbin.io.db.FileTail;
import net.zbin.io.db.HistorianConfig;
import net.zbin.io.db.Ingest;
import net.zbin.io.db.Partitions;
import net.zbin.io.db.Schema;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Follows the lines' record folders (and alarm histories) and writes every row into PostgreSQL, batch by batch, each
 * batch in one transaction with its end position. Never on a line's trigger path: it only reads files the daemons
 * append to. When the database is slow or gone it waits and retries with backoff (0.5 s doubling to 30 s); the files
 * are the backlog, so nothing is lost and nothing is held in memory.
 */
final class Historian implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(Historian.class);
    private final HistorianConfig cfg;
    private final Clock clock;
    private volatile boolean stopping;
    private Connection owner, ingest;
    /** line → file name → {end offset, end line}. */
    private final Map<String, Map<String, long[]>> pos = new HashMap<>();
    final Map<String, LineFigures> figures = new HashMap<>();
    final AtomicLong dbErrors = new AtomicLong();
    /** Day partitions known to exist on this connection: creating one locks the table, so it is done once per day. */
    private final java.util.Set<LocalDate> partitions = new java.util.HashSet<>();
    /** Lines whose record folder was missing at the last look (said once). */
    private final java.util.Set<String> missing = new java.util.HashSet<>();
    private Instant lastRetention = Instant.EPOCH, lastReport = Instant.EPOCH;

    /** What the historian has done for one line, for its log and metrics. */
    static final class LineFigures {
        final AtomicLong stored = new AtomicLong(), already = new AtomicLong(), refused = new AtomicLong();
        volatile long backlogBytes;
        volatile Instant lastRowTime;
    }

    Historian(HistorianConfig cfg, Clock clock) {
        this.cfg = cfg;
        this.clock = clock;
        for (var l : cfg.lines()) figures.put(l.line(), new LineFigures());
    }

    /** Runs until {@link #close}: connect (migrating the schema), follow, and on any database failure wait and start again. */
    void run() throws InterruptedException {
        long backoffMs = 500;
        while (!stopping) {
            try {
                if (ingest == null) connect();
                boolean progressed = false;
                for (var l : cfg.lines()) progressed |= follow(l);
                housekeeping();
                backoffMs = 500;
                if (!progressed) sleep(cfg.pollMs());
            } catch (SQLException e) {
                dbErrors.incrementAndGet();
                LOG.warn("database: {} (SQLSTATE {}); trying again in {} ms, the record files keep the backlog", firstLine(e), e.getSQLState(), backoffMs);
                disconnect();
                sleep(backoffMs);
                backoffMs = Math.min(30_000, backoffMs * 2);
            } catch (org.flywaydb.core.api.FlywayException e) {
                dbErrors.incrementAndGet();
                LOG.warn("database schema: {}; trying again in {} ms", firstLine(e), backoffMs);
                disconnect();
                sleep(backoffMs);
                backoffMs = Math.min(30_000, backoffMs * 2);
            } catch (IOException e) {
                LOG.warn("record files: {}; trying again in {} ms", e.toString(), backoffMs);
                sleep(backoffMs);
                backoffMs = Math.min(30_000, backoffMs * 2);
            } catch (RuntimeException e) { // a defect must not stop the plant's history: say it, start again from the database's position
                LOG.error("historian: unexpected failure; starting again from the committed positions in {} ms", backoffMs, e);
                disconnect();
                sleep(backoffMs);
                backoffMs = Math.min(30_000, backoffMs * 2);
            }
        }
        disconnect();
    }

    private static String firstLine(Exception e) {
        String m = e.getMessage();
        return m == null ? e.toString() : m.lines().findFirst().orElse(m);
    }

    private void sleep(long ms) throws InterruptedException {
        long end = System.nanoTime() + ms * 1_000_000;
        while (!stopping && System.nanoTime() < end) Thread.sleep(Math.min(50, Math.max(1, (end - System.nanoTime()) / 1_000_000)));
    }

    private void connect() throws SQLException {
        String version = Schema.migrate(cfg.owner());
        owner = Db.connect(cfg.owner(), "zbin-historian-owner");
        ingest = Db.connect(cfg.ingest(), "zbin-historian");
        LocalDate today = LocalDate.ofInstant(clock.instant(), ZoneOffset.UTC);
        partitions.clear();
        partitions(List.of(today, today.plusDays(1)));
        pos.clear();
        for (var l : cfg.lines()) pos.put(l.line(), Ingest.positions(ingest, l.line()));
        LOG.info("connected to {} as {} (schema version {}); following {} line(s)", cfg.ingest().url(), cfg.ingest().user(), version, cfg.lines().size());
    }

    /** The partitions of these days, created where this historian has not seen them yet. */
    private void partitions(java.util.Collection<LocalDate> days) throws SQLException {
        List<LocalDate> missing = days.stream().filter(d -> !partitions.contains(d)).toList();
        if (missing.isEmpty()) return;
        Partitions.ensure(owner, missing);
        partitions.addAll(missing);
    }

    private void disconnect() {
        for (Connection c : new Connection[] {ingest, owner}) {
            try {
                if (c != null) c.close();
            } catch (SQLException e) {
                LOG.debug("close: {}", e.toString());
            }
        }
        ingest = owner = null;
    }

    /** One pass over a line's files; true when anything was written. */
    private boolean follow(HistorianConfig.FollowedLine l) throws SQLException, IOException {
        Map<String, long[]> at = pos.get(l.line());
        LineFigures fig = figures.get(l.line());
        boolean any = false;
        long backlog = 0;
        List<Path> files = new ArrayList<>();
        if (!Files.isDirectory(l.records())) {
            if (missing.add(l.line())) LOG.warn("line {}: record folder {} is not there (yet): waiting for it", l.line(), l.records());
            return false;
        }
        missing.remove(l.line());
        try (var s = Files.list(l.records())) {
            s.filter(p -> {
                String n = p.getFileName().toString();
                return n.startsWith(l.line() + "-") && n.endsWith(".csv");
            }).sorted().forEach(files::add);
        }
        for (Path f : files) {
            String name = f.getFileName().toString();
            long[] p = at.get(name);
            if (p == null) {
                String header = FileTail.firstLine(f);
                if (header == null) continue; // the header is still being written
                List<String> cols = Arrays.asList(header.split(",", -1));
                if (cols.isEmpty() || cols.size() > RecordColumns.ALL.size() || !RecordColumns.ALL.subList(0, cols.size()).equals(cols)) {
                    LOG.error("{}: not a record log of this version (header {}): not stored", f, header);
                    at.put(name, new long[] {Long.MAX_VALUE, 0});
                    continue;
                }
                p = new long[] {header.getBytes(java.nio.charset.StandardCharsets.UTF_8).length + 1, 1};
                at.put(name, p);
            }
            if (p[0] == Long.MAX_VALUE) continue;
            long size = Files.size(f);
            if (size < p[0]) {
                LOG.error("{} is shorter than what was stored from it ({} < {} bytes): replaced or truncated, not read again", f, size, p[0]);
                p[0] = Long.MAX_VALUE;
                continue;
            }
            FileTail.Chunk c = FileTail.read(f, p[0], cfg.batchRows());
            if (!c.empty()) {
                partitions(Ingest.days(c.bytes()));
                List<String> header = Arrays.asList(FileTail.firstLine(f).split(",", -1));
                Ingest.Result r = Ingest.records(ingest, l.line(), name, header, c, p[1] + 1);
                count(fig, r);
                fig.lastRowTime = lastTime(c.bytes(), fig.lastRowTime);
                p[0] = c.endOffset();
                p[1] += c.lines();
                any = true;
            }
            backlog += Math.max(0, Files.size(f) - p[0]);
        }
        if (l.state() != null) {
            long[] more = {0};
            any |= followJsonl(l, l.state().resolve("alarms-" + l.line() + ".jsonl"), at, fig, more, Ingest::alarms);
            any |= followJsonl(l, l.state().resolve(net.zbin.io.CompensationStore.HISTORY), at, fig, more, Ingest::captures);
            backlog += more[0];
        }
        fig.backlogBytes = backlog;
        return any;
    }

    /** How one kind of JSON-lines history goes into the database. */
    @FunctionalInterface
    interface JsonlIngest {
        Ingest.Result write(Connection c, String line, String file, FileTail.Chunk chunk, long firstLine) throws SQLException;
    }

    /** One batch of a JSON-lines history file of the line's state folder; adds what is left to {@code backlog[0]}. */
    private boolean followJsonl(HistorianConfig.FollowedLine l, Path f, Map<String, long[]> at, LineFigures fig, long[] backlog, JsonlIngest how)
            throws SQLException, IOException {
        if (!Files.exists(f)) return false;
        String name = f.getFileName().toString();
        long[] p = at.computeIfAbsent(name, k -> new long[] {0, 0});
        if (p[0] == Long.MAX_VALUE) return false;
        boolean any = false;
        FileTail.Chunk c = FileTail.read(f, p[0], cfg.batchRows());
        if (!c.empty()) {
            count(fig, how.write(ingest, l.line(), name, c, p[1] + 1));
            p[0] = c.endOffset();
            p[1] += c.lines();
            any = true;
        }
        backlog[0] += Math.max(0, Files.size(f) - p[0]);
        return any;
    }

    private static void count(LineFigures fig, Ingest.Result r) {
        fig.stored.addAndGet(r.stored());
        fig.already.addAndGet(r.already());
        fig.refused.addAndGet(r.refused());
    }

    /** The time of the last row in a chunk of record lines (its first field). */
    private static Instant lastTime(byte[] chunk, Instant was) {
        int end = chunk.length - 1, start = end;
        while (start > 0 && chunk[start - 1] != '\n') start--;
        int comma = start;
        while (comma < end && chunk[comma] != ',') comma++;
        try {
            return Instant.parse(new String(chunk, start, comma - start, java.nio.charset.StandardCharsets.US_ASCII));
        } catch (java.time.format.DateTimeParseException e) {
            return was;
        }
    }

    /** Tomorrow's partition, retention (hourly), and the lag report (every 10 s). */
    private void housekeeping() throws SQLException {
        Instant now = clock.instant();
        if (now.isAfter(lastRetention.plusSeconds(3600))) {
            LocalDate today = LocalDate.ofInstant(now, ZoneOffset.UTC);
            partitions(List.of(today, today.plusDays(1)));
            if (cfg.retentionDays() > 0) {
                LocalDate keepFrom = today.minusDays(cfg.retentionDays());
                List<String> dropped = Partitions.dropBefore(owner, keepFrom);
                partitions.removeIf(d -> d.isBefore(keepFrom));
                if (!dropped.isEmpty()) LOG.info("retention {} days: dropped {}", cfg.retentionDays(), dropped);
            }
            lastRetention = now;
        }
        if (now.isAfter(lastReport.plusSeconds(10))) {
            for (var e : figures.entrySet()) {
                LineFigures f = e.getValue();
                LOG.info("line {}: {} rows stored ({} already there, {} refused), backlog {} bytes, lag {}", e.getKey(), f.stored.get(), f.already.get(),
                        f.refused.get(), f.backlogBytes, f.lastRowTime == null ? "-" : java.time.Duration.between(f.lastRowTime, now).toSeconds() + " s");
            }
            lastReport = now;
        }
    }

    @Override
    public void close() { stopping = true; }
}
