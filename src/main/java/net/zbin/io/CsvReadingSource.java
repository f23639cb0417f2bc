package net.zbin.io;

import ch.randelshofer.fastdoubleparser.JavaDoubleParser;
import de.siegmar.fastcsv.reader.CsvParseException;
import de.siegmar.fastcsv.reader.CsvReader;
import de.siegmar.fastcsv.reader.CsvRecord;
import java.io.IOException;
import java.io.RandomAccessFile;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.Iterator;
import java.util.Map;
import java.util.Set;
import java.util.function.Consumer;
import net.zbin.core.CompensationSource;
import net.zbin.core.Reason;
import net.zbin.core.RecordedReading;
import net.zbin.core.Trigger;

/**
 * Streams a CSV whose header names at least {@code freq_hz,r_ohm,x_ohm}; other columns are used
 * when known and ignored otherwise. A last line without its newline is a torn write (the logger
 * was killed mid-row): it is reported and skipped, never parsed as data. Memory use does not grow
 * with file size. FastCSV splits the rows and FastDoubleParser reads the numbers, so a replay runs close
 * to the speed of merely reading the file.
 */
final class CsvReadingSource implements ReadingSource {
    private static final Set<String> KINDS = Set.of("part", "open", "short", "reference");

    private final Path file;
    private final Consumer<BadRow> bad;
    private final CsvReader<CsvRecord> reader;
    private final Iterator<CsvRecord> it;
    private final int width, fFreq, fR, fX, fRawR, fRawX, fReason, fAttempt, fComp, fKind, fSeq, fPart, fLot, fReadings;
    private final boolean tornTail;

    CsvReadingSource(Path file, Consumer<BadRow> bad) throws IOException, ConfigException {
        this.file = file;
        this.bad = bad;
        if (!Files.exists(file)) throw new ConfigException(file, null, "file not found");
        this.tornTail = endsWithoutNewline(file);
        // a spreadsheet export starts with a UTF-8 byte-order mark: it is not part of the first column name
        this.reader = CsvReader.builder().skipEmptyLines(true).ignoreDifferentFieldCount(true).detectBomHeader(true)
                .ofCsvRecord(file, StandardCharsets.UTF_8);
        this.it = reader.iterator();
        Map<String, Integer> header = new HashMap<>();
        int fields = 0;
        try {
            if (it.hasNext()) {
                CsvRecord h = it.next();
                fields = h.getFieldCount();
                for (int i = 0; i < fields; i++) header.putIfAbsent(h.getField(i).trim(), i);
            }
        } catch (CsvParseException | UncheckedIOException e) {
            reader.close();
            throw new ConfigException(file, "line 1", "unreadable CSV header: " + e.getMessage());
        }
        for (String col : RecordColumns.REPLAY_REQUIRED)
            if (!header.containsKey(col)) {
                reader.close();
                throw new ConfigException(file, "line 1", "header lacks column '" + col + "' (needs at least "
                        + String.join(",", RecordColumns.REPLAY_REQUIRED) + ")");
            }
        width = fields; // the header's own field count: a repeated column name does not shorten the rows
        fFreq = header.get("freq_hz");
        fR = header.get("r_ohm");
        fX = header.get("x_ohm");
        fRawR = header.getOrDefault("raw_r_ohm", -1);
        fRawX = header.getOrDefault("raw_x_ohm", -1);
        fReason = header.getOrDefault("reason", -1);
        fAttempt = header.getOrDefault("attempt", -1);
        fComp = header.getOrDefault("comp", -1);
        fKind = header.getOrDefault("kind", -1);
        fSeq = header.getOrDefault("seq", -1);
        fPart = header.getOrDefault("part", -1);
        fLot = header.getOrDefault("lot", -1);
        fReadings = header.getOrDefault("readings", -1);
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
            CsvRecord rec;
            try {
                if (!it.hasNext()) return null;
                rec = it.next();
            } catch (CsvParseException | UncheckedIOException e) {
                throw new IOException(file + ": unreadable CSV: " + e.getMessage(), e);
            }
            long line = rec.getStartingLineNumber();
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

    private RecordedReading row(CsvRecord rec, long line) {
        if (rec.getFieldCount() != width) throw new IllegalArgumentException("has " + rec.getFieldCount() + " fields, header has " + width);
        String reason = text(rec, fReason);
        // A row with a reason may have nothing measured (a meter timeout, a line fault): then R, X and the frequency are blank.
        boolean mayBeBlank = reason != null && !reason.isEmpty();
        double r = number(rec, fR, "r_ohm", mayBeBlank), x = number(rec, fX, "x_ohm", mayBeBlank);
        boolean measured = Double.isFinite(r) || Double.isFinite(x);
        double f = number(rec, fFreq, "freq_hz", mayBeBlank && !measured);
        if (!(f > 0) && !Double.isNaN(f)) throw new IllegalArgumentException("freq_hz must be > 0 (was " + rec.getField(fFreq).trim() + ")");
        String attempt = text(rec, fAttempt);
        int att;
        try {
            att = attempt == null || attempt.isEmpty() ? 0 : Integer.parseInt(attempt);
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException("attempt is not a whole number ('" + attempt + "')");
        }
        if (att < 0) throw new IllegalArgumentException("attempt must be >= 0 (was " + att + ")");
        String comp = text(rec, fComp);
        CompensationSource cs = comp == null || comp.isEmpty() ? CompensationSource.NONE : CompensationSource.parse(comp);
        String kindText = text(rec, fKind);
        if (kindText == null || kindText.isEmpty()) kindText = "part";
        if (!KINDS.contains(kindText)) throw new IllegalArgumentException("kind must be part, open, short or reference (was '" + kindText + "')");
        Trigger.Kind kind = Trigger.Kind.parse(kindText);
        Reason why;
        try {
            why = mayBeBlank ? Reason.parse(reason) : null;
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException("reason is not a reason code of zbin ('" + reason + "')");
        }
        String seqText = text(rec, fSeq);
        long seq;
        try {
            seq = seqText == null || seqText.isEmpty() ? -1 : Long.parseLong(seqText);
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException("seq is not a whole number ('" + seqText + "')");
        }
        if (seq < -1) throw new IllegalArgumentException("seq must be >= 0 (was " + seq + ")");
        String readingsText = text(rec, fReadings);
        int readings;
        try {
            readings = readingsText == null || readingsText.isEmpty() ? 1 : Integer.parseInt(readingsText);
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException("readings is not a whole number ('" + readingsText + "')");
        }
        if (readings < 1 || readings > 16) throw new IllegalArgumentException("readings must be 1..16 (was " + readings + ")");
        String part = fPart < 0 ? "" : SpreadsheetSafe.read(rec.getField(fPart));
        String lot = fLot < 0 ? "" : SpreadsheetSafe.read(rec.getField(fLot));
        return new RecordedReading(line, f, r, x, fRawR < 0 ? Double.NaN : number(rec, fRawR, "raw_r_ohm", true),
                fRawX < 0 ? Double.NaN : number(rec, fRawX, "raw_x_ohm", true), why, att, cs, kind, seq, part, lot, readings);
    }

    private static String text(CsvRecord rec, int i) { return i < 0 ? null : rec.getField(i).trim(); }

    private static double number(CsvRecord rec, int i, String col, boolean blankOk) {
        String s = rec.getField(i);
        if (s.isEmpty() || s.isBlank()) {
            if (blankOk) return Double.NaN;
            throw new IllegalArgumentException(col + " is empty");
        }
        try {
            return JavaDoubleParser.parseDouble(s);
        } catch (NumberFormatException e) {
            try {
                return JavaDoubleParser.parseDouble(s.trim());
            } catch (NumberFormatException e2) {
                throw new IllegalArgumentException(col + " is not a number ('" + s.trim() + "')");
            }
        }
    }

    @Override
    public void close() throws IOException { reader.close(); }
}
