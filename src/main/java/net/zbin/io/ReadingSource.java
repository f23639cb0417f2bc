package net.zbin.io;

import java.io.Closeable;
import java.io.IOException;
import java.util.function.Consumer;
import net.zbin.core.RecordedReading;

/**
 * A stream of replay rows from one input format. Rows that cannot be read are reported to the
 * listener (with their line number) and skipped; {@link #next()} returns null at the end.
 */
public interface ReadingSource extends Closeable {
    RecordedReading next() throws IOException;

    /** A row skipped as unreadable, by line number. */
    record BadRow(long line, String message) {}

    /** Opens the reader for the file's format. Only CSV exists so far. */
    static ReadingSource open(java.nio.file.Path file, Consumer<BadRow> bad) throws IOException, ConfigException {
        return new CsvReadingSource(file, bad);
    }
}
