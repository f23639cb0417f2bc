package net.zbin.app;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.Locale;

/**
 * Progress of a long read on stderr: rows, rows per second and the time left, once a second. On by
 * default only when stderr is a terminal (redrawn in place there); {@code --progress} asks for it anyway
 * (plain lines), {@code --quiet} silences it.
 */
final class RowProgress {
    private final PrintWriter err;
    private final boolean on, terminal;
    private final long total;
    private final long start = System.nanoTime();
    private long last = start, rows;

    RowProgress(PrintWriter err, Path file, boolean quiet, boolean asked) throws IOException {
        this.err = err;
        this.terminal = System.console() != null;
        this.on = !quiet && (asked || terminal);
        this.total = on ? lines(file) - 1 : 0;
    }

    /** Lines in the file, counted by a plain scan for newlines (only when progress is shown). */
    static long lines(Path f) throws IOException {
        long n = 0;
        try (FileChannel ch = FileChannel.open(f, StandardOpenOption.READ)) {
            ByteBuffer buf = ByteBuffer.allocateDirect(1 << 20);
            while (ch.read(buf) > 0) {
                buf.flip();
                while (buf.hasRemaining()) if (buf.get() == '\n') n++;
                buf.clear();
            }
        }
        return n;
    }

    void row() {
        rows++;
        if (!on || (rows & 0x3fff) != 0) return;
        long now = System.nanoTime();
        if (now - last < 1_000_000_000L) return;
        last = now;
        double s = (now - start) / 1e9, rate = rows / s;
        String text = String.format(Locale.ROOT, "  %,d of %,d rows, %,.0f rows/s, %.0f s left", rows, total, rate, Math.max(0, (total - rows) / rate));
        if (terminal) err.print("\r" + text + "   ");
        else err.println(text);
        err.flush();
    }

    void done() {
        if (on && terminal) {
            err.println();
            err.flush();
        }
    }
}
