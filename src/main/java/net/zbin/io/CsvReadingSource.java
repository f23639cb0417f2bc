package net.zbin.io;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.RandomAccessFile;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.Iterator;
import java.util.Map;
import java.util.function.Consumer;
import net.zbin.core.RecordedReading;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import net.zbin.core.CompensationSource;

/**
 * Streams a CSV whose header names at least {@code freq_hz,r_ohm,x_ohm}; other columns are used
 * when known and ignored otherwise. A last line without its newline is a torn write (the logger
 * was killed mid-row): it is reported and skipped, never parsed as data. Memory use does not grow
 * with file size.
 */
final class CsvReadingSource implements ReadingSource {
    private final Path file;
    private final Consumer<BadRow> bad;
    private final CSVParser parser;
    private final Iterator<CSVRecord> it;
    private final Map<String, Integer> header;
    private final boolean tornTail;

    CsvReadingSource(Path file, Consumer<BadRow> bad) throws IOException, ConfigException {
        this.file = file;
        this.bad = bad;
        BufferedReader reader;
        try {
            reader = Files.newBufferedReader(file, StandardCharsets.UTF_8);
        } catch (NoSuchFileException e) {
            throw new ConfigException(file, null, "file not found");
        }
        this.tornTail = endsWithoutNewline(file);
        CSVFormat fmt = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).setIgnoreEmptyLines(true)
                .setTrim(true).get();
        try {
            this.parser = CSVParser.parse(reader, fmt);
        } catch (IOException | IllegalArgumentException | UncheckedIOException e) {
            reader.close();
            throw new ConfigException(file, "line 1", "unreadable CSV header: " + e.getMessage());
        }
        this.header = parser.getHeaderMap();
        for (String col : RecordColumns.REPLAY_REQUIRED)
            if (header == null || !header.containsKey(col)) {
                parser.close();
                throw new ConfigException(file, "line 1", "header lacks column '" + col + "' (needs at least "
                        + String.join(",", RecordColumns.REPLAY_REQUIRED) + ")");
            }
        this.it = parser.iterator();
    }

    private static boolean endsWithoutNewline(Path file) throws IOException {
        try (RandomAccessFile raf = new RandomAccessFile(file.toFile(), "r")) {
            long len = raf.length();
            if (len == 0) return false;
            raf.seek(len - 1);
            int last = raf.read();
            return last != '\n' && last != '\r';
        }
    }

    @Override
    public RecordedReading next() throws IOException {
        while (true) {
            CSVRecord rec;
            try {
                if (!it.hasNext()) return null;
                rec = it.next();
            } catch (UncheckedIOException | IllegalStateException e) {
                throw new IOException(file + ": line " + parser.getCurrentLineNumber() + ": unreadable CSV: " + e.getMessage(), e);
            }
            long line = parser.getCurrentLineNumber();
            if (tornTail && !it.hasNext()) {
                bad.accept(new BadRow(line, "torn last line (no newline at end of file), skipped"));
                return null;
            }
            try {
                return row(rec, line);
            } catch (IllegalArgumentException e) {
                bad.accept(new BadRow(line, e.getMessage()));
            }
        }
    }

    private RecordedReading row(CSVRecord rec, long line) {
        if (!rec.isConsistent()) throw new IllegalArgumentException("has " + rec.size() + " fields, header has " + header.size());
        String reason = opt(rec, "reason");
        double f = number(rec, "freq_hz", false);
        if (!(f > 0)) throw new IllegalArgumentException("freq_hz must be > 0 (was " + rec.get("freq_hz") + ")");
        boolean mayBeBlank = reason != null && !reason.isEmpty();
        double r = number(rec, "r_ohm", mayBeBlank), x = number(rec, "x_ohm", mayBeBlank);
        String attempt = opt(rec, "attempt");
        int att;
        try {
            att = attempt == null || attempt.isEmpty() ? 0 : Integer.parseInt(attempt);
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException("attempt is not a whole number ('" + attempt + "')");
        }
        if (att < 0) throw new IllegalArgumentException("attempt must be >= 0 (was " + att + ")");
        String comp = opt(rec, "comp");
        CompensationSource cs = comp == null || comp.isEmpty() ? CompensationSource.NONE : CompensationSource.parse(comp);
        String kind = opt(rec, "kind");
        if (kind == null || kind.isEmpty()) kind = "part";
        if (!java.util.Set.of("part", "open", "short", "reference").contains(kind))
            throw new IllegalArgumentException("kind must be part, open, short or reference (was '" + kind + "')");
        return new RecordedReading(line, f, r, x, optNumber(rec, "raw_r_ohm"), optNumber(rec, "raw_x_ohm"),
                mayBeBlank ? reason : null, att, cs, kind);
    }

    private String opt(CSVRecord rec, String col) {
        return header.containsKey(col) && rec.isSet(col) ? rec.get(col) : null;
    }

    private double number(CSVRecord rec, String col, boolean blankOk) {
        String s = rec.get(col);
        if (s.isEmpty()) {
            if (blankOk) return Double.NaN;
            throw new IllegalArgumentException(col + " is empty");
        }
        try {
            return Double.parseDouble(s);
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException(col + " is not a number ('" + s + "')");
        }
    }

    private double optNumber(CSVRecord rec, String col) {
        String s = opt(rec, col);
        if (s == null || s.isEmpty()) return Double.NaN;
        try {
            return Double.parseDouble(s);
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException(col + " is not a number ('" + s + "')");
        }
    }

    @Override
    public void close() throws IOException { parser.close(); }
}
