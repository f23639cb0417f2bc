package net.zbin.io.db;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;

/**
 * The complete lines of a growing file after a byte offset: up to {@code maxLines} lines, ending at a newline. A last
 * line without its newline is being written (or was torn by a crash): it is left for the next look, never returned.
 */
public final class FileTail {
    private FileTail() {}

    /**
     * @param bytes    the lines, each ending in a newline
     * @param endOffset the offset after the last returned byte (where to start next time)
     * @param lines    how many lines
     */
    public record Chunk(byte[] bytes, long endOffset, int lines) {
        public boolean empty() { return lines == 0; }
    }

    /** At most 64 MiB at a time, whatever {@code maxLines} allows. */
    static final int MAX_BYTES = 64 << 20;

    public static Chunk read(Path file, long offset, int maxLines) throws IOException {
        try (FileChannel ch = FileChannel.open(file, StandardOpenOption.READ)) {
            long size = ch.size();
            if (size <= offset) return new Chunk(new byte[0], offset, 0);
            long left = size - offset;
            // about what maxLines take (a record row is some 330 bytes), more only when the lines are longer
            int want = (int) Math.min(left, Math.min(MAX_BYTES, Math.max(64 << 10, (long) maxLines * 512)));
            while (true) {
                ByteBuffer buf = ByteBuffer.allocate(want);
                while (buf.hasRemaining() && ch.read(buf, offset + buf.position()) > 0) { /* fill */ }
                byte[] b = buf.array();
                int n = buf.position(), lines = 0, end = 0;
                for (int i = 0; i < n; i++) {
                    if (b[i] != '\n') continue;
                    lines++;
                    end = i + 1;
                    if (lines == maxLines) break;
                }
                if (lines < maxLines && n == want && want < left && want < MAX_BYTES) {
                    want = (int) Math.min(left, Math.min(MAX_BYTES, 2L * want)); // the lines are longer than guessed: read more
                    continue;
                }
                return new Chunk(java.util.Arrays.copyOf(b, end), offset + end, lines);
            }
        }
    }

    /** The file's first line (a CSV header), or null while it is not complete. */
    public static String firstLine(Path file) throws IOException {
        Chunk c = read(file, 0, 1);
        if (c.empty()) return null;
        String s = new String(c.bytes(), java.nio.charset.StandardCharsets.UTF_8);
        return s.endsWith("\r\n") ? s.substring(0, s.length() - 2) : s.substring(0, s.length() - 1);
    }
}
