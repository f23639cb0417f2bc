package net.zbin.io;

import ch.randelshofer.fastdoubleparser.JavaDoubleParser;
import de.siegmar.fastcsv.reader.CsvRecord;
import java.io.IOException;
import java.nio.file.Path;
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
    private final CsvTable table;
    private final int width, fFreq, fR, fX, fRawR, fRawX, fReason, fAttempt, fComp, fKind, fSeq, fPart, fLot, fReadings, fSteps;

    CsvReadingSource(Path file, Consumer<BadRow> bad) throws IOException, ConfigException {
        this.file = file;
        this.bad = bad;
        this.table = new CsvTable(file);
        for (String col : RecordColumns.REPLAY_REQUIRED)
            if (table.column(col) < 0) {
                table.close();
                throw new ConfigException(file, "line 1", "header lacks column '" + col + "' (needs at least "
                        + String.join(",", RecordColumns.REPLAY_REQUIRED) + ")");
            }
        width = table.width();
        fFreq = table.column("freq_hz");
        fR = table.column("r_ohm");
        fX = table.column("x_ohm");
        fRawR = table.column("raw_r_ohm");
        fRawX = table.column("raw_x_ohm");
        fReason = table.column("reason");
        fAttempt = table.column("attempt");
        fComp = table.column("comp");
        fKind = table.column("kind");
        fSeq = table.column("seq");
        fPart = table.column("part");
        fLot = table.column("lot");
        fReadings = table.column("readings");
        fSteps = table.column("steps");
    }

    @Override
    public RecordedReading next() throws IOException {
        while (true) {
            CsvTable.Row r = table.next();
            if (r == null) return null;
            if (r.torn()) {
                bad.accept(new BadRow(r.line(), "torn last line (no newline at end of file), skipped"));
                return null;
            }
            try {
                return row(r.record(), r.line());
            } catch (IllegalArgumentException e) {
                bad.accept(new BadRow(r.line(), e.getMessage()));
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
        int att = (int) whole(rec, fAttempt, "attempt", 0, 0, Integer.MAX_VALUE);
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
        long seq = whole(rec, fSeq, "seq", -1, 0, Long.MAX_VALUE); // blank: the file has no seq (−1)
        int readings = (int) whole(rec, fReadings, "readings", 1, 1, 16);
        String part = fPart < 0 ? "" : SpreadsheetSafe.read(rec.getField(fPart));
        String lot = fLot < 0 ? "" : SpreadsheetSafe.read(rec.getField(fLot));
        return new RecordedReading(line, f, r, x, fRawR < 0 ? Double.NaN : number(rec, fRawR, "raw_r_ohm", true),
                fRawX < 0 ? Double.NaN : number(rec, fRawX, "raw_x_ohm", true), why, att, cs, kind, seq, part, lot, readings, fSteps < 0 ? java.util.List.of() : StepsJson.decode(rec.getField(fSteps)));
    }

    /** A whole-number cell within [min, max], or {@code blank} when the column is absent or the cell empty. */
    private static long whole(CsvRecord rec, int i, String col, long blank, long min, long max) {
        String t = text(rec, i);
        if (t == null || t.isEmpty()) return blank;
        long v;
        try {
            v = Long.parseLong(t);
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException(col + " is not a whole number ('" + t + "')");
        }
        if (v < min || v > max) throw new IllegalArgumentException(col + " must be " + min + (max == Long.MAX_VALUE || max == Integer.MAX_VALUE
                ? " or more" : ".." + max) + " (was " + v + ")");
        return v;
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
    public void close() throws IOException { table.close(); }
}
