package net.zbin.io;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.time.LocalDate;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.function.Consumer;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import net.zbin.core.CompensationSource;
import net.zbin.core.Decision;
import net.zbin.core.EquivalentModel;
import net.zbin.core.Grading;
import net.zbin.core.Impedance;
import net.zbin.core.PrimaryParam;
import net.zbin.core.Reason;
import net.zbin.core.Trigger;
import net.zbin.core.Verdict;
import ch.randelshofer.fastdoubleparser.JavaDoubleParser;
import de.siegmar.fastcsv.reader.CsvRecord;

/**
 * Reads a line's own record log back into decisions, oldest first, so that a restarted daemon knows
 * what it answered before it stopped. Rows that do not read back whole (a torn last line) are skipped.
 */
public final class RecordLogReader {
    private RecordLogReader() {}

    /** The line's log files of the given UTC days and later, in writing order. */
    public static List<Path> files(Path dir, String line, LocalDate fromDay) throws IOException {
        if (!Files.isDirectory(dir)) return List.of();
        Pattern p = Pattern.compile(Pattern.quote(line) + "-(\\d{4}-\\d{2}-\\d{2})(?:\\.(\\d+))?\\.csv");
        List<Object[]> found = new ArrayList<>();
        try (Stream<Path> s = Files.list(dir)) {
            for (Path f : s.toList()) {
                Matcher m = p.matcher(f.getFileName().toString());
                if (!m.matches()) continue;
                LocalDate d = LocalDate.parse(m.group(1));
                if (d.isBefore(fromDay)) continue;
                found.add(new Object[] {d, m.group(2) == null ? 0 : Integer.parseInt(m.group(2)), f});
            }
        }
        found.sort(Comparator.<Object[], LocalDate>comparing(o -> (LocalDate) o[0]).thenComparing(o -> (Integer) o[1]));
        return found.stream().map(o -> (Path) o[2]).toList();
    }

    /** Every whole row of the line's log from {@code since}'s UTC day on, oldest first; returns the rows that could not be read. */
    public static long read(Path dir, String line, Instant since, Consumer<net.zbin.core.DecisionEvent> sink) throws IOException {
        return read(dir, line, since, Instant.MAX, sink);
    }

    /**
     * Every whole row from {@code since}'s UTC day up to {@code until}, oldest first. Files dated after {@code until}'s
     * day and rows stamped after {@code until} are from a clock that was wrong: they are set aside (with one warning
     * each), never taken for what the line decided last. A row that cannot be read (cut short, a field that is not what
     * its column holds) is skipped and counted, with one warning per file naming the first; returns how many.
     */
    public static long read(Path dir, String line, Instant since, Instant until, Consumer<net.zbin.core.DecisionEvent> sink) throws IOException {
        long skipped = 0;
        for (Path f : files(dir, line, LocalDate.ofInstant(since, ZoneOffset.UTC))) skipped += readFile(f, line, 0, -1, until, sink);
        return skipped;
    }

    /**
     * The rows from {@code from} (a place where a row starts) up to {@code to} (the same; null: the log's end), in the
     * files of {@code from}'s on, in writing order; otherwise as {@link #read(Path, String, Instant, Instant, Consumer)}.
     *
     * @throws IOException {@code from}'s file is not among the line's log files
     */
    public static long readRange(Path dir, String line, RecordLog.Position from, RecordLog.Position to, Instant until,
                                 Consumer<net.zbin.core.DecisionEvent> sink) throws IOException {
        List<Path> all = files(dir, line, dayOf(from.file(), line));
        int i = all.indexOf(from.file());
        if (i < 0) throw new IOException(from.file() + ": not among the record files of line " + line + " in " + dir);
        long skipped = 0;
        for (; i < all.size(); i++) {
            Path f = all.get(i);
            boolean last = to != null && f.equals(to.file());
            skipped += readFile(f, line, f.equals(from.file()) ? from.offset() : 0, last ? to.offset() : -1, until, sink);
            if (last) break;
        }
        return skipped;
    }

    private static long readFile(Path f, String line, long fromByte, long toByte, Instant until,
                                 Consumer<net.zbin.core.DecisionEvent> sink) throws IOException {
        LocalDate lastDay = until.equals(Instant.MAX) ? LocalDate.MAX : LocalDate.ofInstant(until, ZoneOffset.UTC);
        LocalDate day = dayOf(f, line);
        if (day.isAfter(lastDay)) {
            org.slf4j.LoggerFactory.getLogger(RecordLogReader.class).warn("record file {} is dated after today ({}): set aside, "
                    + "not read back (a clock that was wrong when it was written?)", f, lastDay);
            return 0;
        }
        long future = 0, unreadable = 0;
        String firstBad = null;
        try (CsvTable t = new CsvTable(f, fromByte, toByte)) {
            Columns c = new Columns(t);
            RowTimes times = new RowTimes();
            CsvTable.Row row;
            while ((row = t.next()) != null) {
                if (row.torn()) break; // a torn last line is cut when the log reopens the file; never read as a row
                net.zbin.core.DecisionEvent e;
                try {
                    e = entry(c, times, row.record());
                } catch (RuntimeException ex) {
                    unreadable++;
                    if (firstBad == null) firstBad = "line " + row.line() + ": " + ex.getMessage();
                    continue;
                }
                if (e.time().isAfter(until)) {
                    future++;
                    continue;
                }
                sink.accept(e);
            }
        } catch (ConfigException | IOException e) {
            org.slf4j.LoggerFactory.getLogger(RecordLogReader.class).warn("record file {} unreadable, not read back: {}", f, e.getMessage());
        }
        if (unreadable > 0) org.slf4j.LoggerFactory.getLogger(RecordLogReader.class).warn("record file {}: {} rows could not be read back"
                + " (first at {})", f, unreadable, firstBad);
        if (future > 0) org.slf4j.LoggerFactory.getLogger(RecordLogReader.class).warn("record file {}: {} rows stamped after {} "
                + "set aside, not read back", f, future, until);
        return unreadable;
    }

    private static LocalDate dayOf(Path f, String line) {
        String name = f.getFileName().toString();
        return LocalDate.parse(name.substring(line.length() + 1, line.length() + 11));
    }

    /** The record columns' indices in one file (its header may be an older, shorter one). */
    private static final class Columns {
        final int width, time, line, lot, seq, part, kind, recipe, freq, r, x, rawR, rawX, model, param, value, dev, bin, grade, verdict,
                reason, latency, comp, attempt, readings, steps;

        Columns(CsvTable t) {
            width = t.width();
            time = t.column("time");
            line = t.column("line");
            lot = t.column("lot");
            seq = t.column("seq");
            part = t.column("part");
            kind = t.column("kind");
            recipe = t.column("recipe");
            freq = t.column("freq_hz");
            r = t.column("r_ohm");
            x = t.column("x_ohm");
            rawR = t.column("raw_r_ohm");
            rawX = t.column("raw_x_ohm");
            model = t.column("model");
            param = t.column("param");
            value = t.column("value");
            dev = t.column("dev_pct");
            bin = t.column("bin");
            grade = t.column("grade");
            verdict = t.column("verdict");
            reason = t.column("reason");
            latency = t.column("latency_ms");
            comp = t.column("comp");
            attempt = t.column("attempt");
            readings = t.column("readings");
            steps = t.column("steps");
        }
    }

    private static String cell(CsvRecord r, int i, String name) {
        if (i < 0) throw new IllegalArgumentException("no column " + name);
        return r.getField(i);
    }

    /** A free-text cell as the text it was before it was written spreadsheet-safe. */
    private static String text(CsvRecord r, int i, String name) { return SpreadsheetSafe.read(cell(r, i, name)); }

    /** One row as the decision it recorded; a row that is not whole throws, saying why. */
    static net.zbin.core.DecisionEvent entry(Columns c, RowTimes times, CsvRecord r) {
        if (r.getFieldCount() != c.width) throw new IllegalArgumentException("has " + r.getFieldCount() + " fields, header has " + c.width);
        Instant time = times.parse(cell(r, c.time, "time"));
        double f = num(r, c.freq, "freq_hz"), rr = num(r, c.r, "r_ohm"), x = num(r, c.x, "x_ohm");
        Impedance z = Double.isFinite(f) && f > 0 && Double.isFinite(rr) && Double.isFinite(x) ? new Impedance(f, rr, x) : null;
        String n = c.readings < 0 ? "" : r.getField(c.readings);
        Grading.Measurement m = Double.isFinite(f) && f > 0
                ? new Grading.Measurement(f, z, num(r, c.rawR, "raw_r_ohm"), num(r, c.rawX, "raw_x_ohm"), CompensationSource.parse(cell(r, c.comp, "comp")),
                        n.isEmpty() ? 1 : Integer.parseInt(n))
                : null;
        String param = cell(r, c.param, "param");
        Grading.Value v = param.isEmpty() ? null : new Grading.Value(EquivalentModel.valueOf(cell(r, c.model, "model").toUpperCase(java.util.Locale.ROOT)),
                PrimaryParam.parse(param), num(r, c.value, "value"), num(r, c.dev, "dev_pct"));
        Grading g = new Grading(new Grading.Outcome(Integer.parseInt(cell(r, c.bin, "bin")), text(r, c.grade, "grade"),
                Verdict.valueOf(cell(r, c.verdict, "verdict").toUpperCase(java.util.Locale.ROOT)), Reason.parse(cell(r, c.reason, "reason"))), m, v,
                c.steps < 0 ? List.of() : StepsJson.decode(r.getField(c.steps)));
        Decision d = new Decision(Long.parseLong(cell(r, c.seq, "seq")), text(r, c.part, "part"), text(r, c.lot, "lot"),
                Trigger.Kind.parse(cell(r, c.kind, "kind")), text(r, c.recipe, "recipe"), g, num(r, c.latency, "latency_ms"), false,
                Integer.parseInt(cell(r, c.attempt, "attempt")));
        return new net.zbin.core.DecisionEvent(time, text(r, c.line, "line"), d);
    }

    private static double num(CsvRecord r, int i, String name) {
        String s = cell(r, i, name);
        return s.isEmpty() ? Double.NaN : JavaDoubleParser.parseDouble(s); // the same double as Double.parseDouble, a third of the read-back's time less
    }
}
