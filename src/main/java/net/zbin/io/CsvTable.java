package net.zbin.io;

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

/**
 * A CSV file read by its header's column names, the one way zbin reads its record logs and reading files (FastCSV).
 * Rows come with their line numbers. A last line without its newline is a torn write (the writer was killed
 * mid-row): {@link #next} says so instead of giving it as a row. Memory does not grow with the file.
 */
final class CsvTable implements AutoCloseable {
    /** A row and the line it starts on; {@code torn} for a last line without its newline (not data). */
    record Row(long line, CsvRecord record, boolean torn) {}

    private final Path file;
    private final CsvReader<CsvRecord> reader;
    private final Iterator<CsvRecord> it;
    private final Map<String, Integer> header = new HashMap<>();
    private final int width;
    private final boolean tornTail;

    CsvTable(Path file) throws IOException, ConfigException { this(file, 0, -1); }

    /**
     * The rows in bytes {@code from} (0, or an offset where a row starts) up to {@code to} (an offset where a row starts
     * or the file ends; −1: the file's end) under the file's header. Row line numbers count from {@code from}.
     */
    CsvTable(Path file, long from, long to) throws IOException, ConfigException {
        this.file = file;
        if (!Files.exists(file)) throw new ConfigException(file, null, "file not found");
        this.tornTail = to < 0 && endsWithoutNewline(file);
        // a spreadsheet export starts with a UTF-8 byte-order mark: it is not part of the first column name
        CsvReader.CsvReaderBuilder b = CsvReader.builder().skipEmptyLines(true).ignoreDifferentFieldCount(true).detectBomHeader(true);
        int fields = 0;
        CsvReader<CsvRecord> r = b.ofCsvRecord(file, StandardCharsets.UTF_8);
        Iterator<CsvRecord> h0 = r.iterator();
        try {
            if (h0.hasNext()) {
                CsvRecord h = h0.next();
                fields = h.getFieldCount();
                for (int i = 0; i < fields; i++) header.putIfAbsent(h.getField(i).trim(), i);
            }
        } catch (CsvParseException | UncheckedIOException e) {
            r.close();
            throw new ConfigException(file, "line 1", "unreadable CSV header: " + e.getMessage());
        }
        width = fields; // the header's own field count: a repeated column name does not shorten the rows
        if (from > 0 || to >= 0) { // the rows from an offset: a reader of their bytes only
            r.close();
            r = b.ofCsvRecord(rangeReader(file, from, to));
            h0 = r.iterator();
        }
        this.reader = r;
        this.it = h0;
    }

    private static java.io.Reader rangeReader(Path file, long from, long to) throws IOException {
        java.nio.channels.FileChannel ch = java.nio.channels.FileChannel.open(file, java.nio.file.StandardOpenOption.READ);
        try {
            ch.position(from);
            java.io.InputStream in = java.nio.channels.Channels.newInputStream(ch);
            if (to >= 0) in = upTo(in, to - from); // a bounded span, streamed: it may be ten minutes of rows
            return new java.io.BufferedReader(new java.io.InputStreamReader(in, StandardCharsets.UTF_8), 1 << 16);
        } catch (IOException | RuntimeException e) {
            ch.close();
            throw e;
        }
    }

    /** {@code in} ending after {@code limit} bytes (closing it closes {@code in}). */
    private static java.io.InputStream upTo(java.io.InputStream in, long limit) {
        return new java.io.FilterInputStream(in) {
            private long left = Math.max(0, limit);

            @Override
            public int read() throws IOException {
                if (left <= 0) return -1;
                int b = super.read();
                if (b >= 0) left--;
                return b;
            }

            @Override
            public int read(byte[] buf, int off, int len) throws IOException {
                if (left <= 0) return -1;
                int n = super.read(buf, off, (int) Math.min(len, left));
                if (n > 0) left -= n;
                return n;
            }

            @Override
            public long skip(long n) throws IOException {
                long s = super.skip(Math.min(n, left));
                left -= s;
                return s;
            }

            @Override
            public int available() throws IOException { return (int) Math.min(super.available(), left); }
        };
    }

    /** The column's index, or −1 when the header has no such column. */
    int column(String name) { return header.getOrDefault(name, -1); }

    /** Fields per row, as the header has them. */
    int width() { return width; }

    Path file() { return file; }

    /** The next row, or null at the end. */
    Row next() throws IOException {
        CsvRecord rec;
        try {
            if (!it.hasNext()) return null;
            rec = it.next();
        } catch (CsvParseException | UncheckedIOException e) {
            throw new IOException(file + ": unreadable CSV: " + e.getMessage(), e);
        }
        return new Row(rec.getStartingLineNumber(), rec, tornTail && !it.hasNext());
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
    public void close() throws IOException { reader.close(); }
}
