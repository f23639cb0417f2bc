package net.zbin.io;

import java.io.IOException;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
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
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;

/**
 * Reads a line's own record log back into decisions, oldest first, so that a restarted daemon knows
 * what it answered before it stopped. Rows that do not read back whole (a torn last line) are skipped.
 */
public final class RecordLogReader {
    private RecordLogReader() {}

    private static final CSVFormat FORMAT = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get();

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

    /** Every whole row of the line's log from {@code since}'s UTC day on, oldest first. */
    public static void read(Path dir, String line, Instant since, Consumer<net.zbin.core.DecisionEvent> sink) throws IOException {
        read(dir, line, since, Instant.MAX, sink);
    }

    /**
     * Every whole row from {@code since}'s UTC day up to {@code until}, oldest first. Files dated after {@code until}'s
     * day and rows stamped after {@code until} are from a clock that was wrong: they are set aside (with one warning
     * each), never taken for what the line decided last.
     */
    public static void read(Path dir, String line, Instant since, Instant until, Consumer<net.zbin.core.DecisionEvent> sink) throws IOException {
        LocalDate lastDay = until.equals(Instant.MAX) ? LocalDate.MAX : LocalDate.ofInstant(until, ZoneOffset.UTC);
        for (Path f : files(dir, line, LocalDate.ofInstant(since, ZoneOffset.UTC))) {
            LocalDate day = dayOf(f, line);
            if (day.isAfter(lastDay)) {
                org.slf4j.LoggerFactory.getLogger(RecordLogReader.class).warn("record file {} is dated after today ({}): set aside, "
                        + "not read back (a clock that was wrong when it was written?)", f, lastDay);
                continue;
            }
            long future = 0;
            try (Reader r = Files.newBufferedReader(f, StandardCharsets.UTF_8); CSVParser p = FORMAT.parse(r)) {
                for (CSVRecord rec : p) {
                    net.zbin.core.DecisionEvent e = entry(rec);
                    if (e == null) continue;
                    if (e.time().isAfter(until)) {
                        future++;
                        continue;
                    }
                    sink.accept(e);
                }
            } catch (java.io.UncheckedIOException | IllegalStateException e) {
                // a torn last line in quotes: everything before it was read
            }
            if (future > 0) org.slf4j.LoggerFactory.getLogger(RecordLogReader.class).warn("record file {}: {} rows stamped after {} "
                    + "set aside, not read back", f, future, until);
        }
    }

    private static LocalDate dayOf(Path f, String line) {
        String name = f.getFileName().toString();
        return LocalDate.parse(name.substring(line.length() + 1, line.length() + 11));
    }

    /** A free-text cell as the text it was before it was written spreadsheet-safe. */
    private static String text(CSVRecord r, String column) { return SpreadsheetSafe.read(r.get(column)); }

    /** One row as the decision it recorded, or null when the row is not whole. */
    static net.zbin.core.DecisionEvent entry(CSVRecord r) {
        if (!r.isConsistent()) return null;
        try {
            Instant time = Instant.parse(r.get("time"));
            double f = num(r, "freq_hz"), rr = num(r, "r_ohm"), x = num(r, "x_ohm");
            Impedance z = Double.isFinite(f) && f > 0 && Double.isFinite(rr) && Double.isFinite(x) ? new Impedance(f, rr, x) : null;
            Grading.Measurement m = Double.isFinite(f) && f > 0
                    ? new Grading.Measurement(f, z, num(r, "raw_r_ohm"), num(r, "raw_x_ohm"), CompensationSource.parse(r.get("comp")),
                            r.isMapped("readings") && !r.get("readings").isEmpty() ? Integer.parseInt(r.get("readings")) : 1)
                    : null;
            Grading.Value v = r.get("param").isEmpty() ? null : new Grading.Value(EquivalentModel.valueOf(r.get("model").toUpperCase(java.util.Locale.ROOT)),
                    PrimaryParam.parse(r.get("param")), num(r, "value"), num(r, "dev_pct"));
            Grading g = new Grading(new Grading.Outcome(Integer.parseInt(r.get("bin")), text(r, "grade"),
                    Verdict.valueOf(r.get("verdict").toUpperCase(java.util.Locale.ROOT)), Reason.parse(r.get("reason"))), m, v);
            Decision d = new Decision(Long.parseLong(r.get("seq")), text(r, "part"), text(r, "lot"), Trigger.Kind.parse(r.get("kind")),
                    text(r, "recipe"), g, num(r, "latency_ms"), false, Integer.parseInt(r.get("attempt")));
            return new net.zbin.core.DecisionEvent(time, text(r, "line"), d);
        } catch (RuntimeException e) {
            return null;
        }
    }

    private static double num(CSVRecord r, String col) {
        String s = r.get(col);
        return s.isEmpty() ? Double.NaN : Double.parseDouble(s);
    }
}
