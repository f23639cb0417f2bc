package net.zbin.app.daemon;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.time.Clock;
import net.zbin.core.LineEngine;
import net.zbin.io.Json;
import net.zbin.io.RecordLog;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * What the record log's rows built up in the line's figures and monitor, as of a place in the log, so that a restart
 * reads only the rows after it instead of the whole day. Written by the running daemon every dashboard period and at a
 * clean stop ({@code <state_dir>/readback-<line>.json}); used only when it provably belongs to the log as it is now: the
 * same line, recipe, monitor settings, deadline and repeat window ({@code fingerprint}), and its file still holding
 * the same bytes before its offset (CRC-32 of up to {@link #CRC_BYTES}). Anything else — no file, another format, a
 * log cut shorter after a power loss, a record folder moved — and the restart reads the log back in full, as before.
 *
 * @param format      {@link #FORMAT}
 * @param fingerprint what the state depends on besides the rows ({@link Daemon}'s)
 * @param file        the record file (name, in the record folder) the state is as of
 * @param offset      the byte offset in it just after the last row the state holds
 * @param crc32       CRC-32 of the {@code crcBytes} bytes before {@code offset}
 * @param bookFile    the record file of the first row of the last repeat window before {@code offset}
 * @param bookOffset  that row's offset: the rows from there to {@code offset} go back into the decision book
 * @param lastRowAt   the time of the last row the state holds
 * @param bookLot     the decision book's lot
 */
record ReadBackCheckpoint(int format, String line, String fingerprint, String file, long offset, long crc32, int crcBytes,
                          String bookFile, long bookOffset, String lastRowAt, String bookLot, LineStats.State stats,
                          LineEngine.State monitor) {
    private static final Logger LOG = LoggerFactory.getLogger(ReadBackCheckpoint.class);
    static final int FORMAT = 1;
    static final int CRC_BYTES = 4096;

    /** The state at a cut of the log, taken on the measuring thread (copies; the figures' finished by the writer, later). */
    record Taken(RecordLog.Cut cut, String fingerprint, String bookLot, java.util.function.Supplier<LineStats.State> stats,
                 LineEngine.State monitor) {}

    /**
     * The line's state as of where its log stands, taken between two decisions (on the measuring thread, or once it
     * stopped); null when the log cannot say where it stands or a lot's start is pending.
     */
    static Taken take(TriggerPath path, RecordLog records, LineStats stats, MonitorListener monitor, long repeatWindowMs, String fingerprint) {
        return path.settled(() -> {
            var cut = records.cut(repeatWindowMs);
            return cut == null ? null : new Taken(cut, fingerprint, path.lot(), stats.capture(), monitor.state());
        });
    }

    static Path file(Path stateDir, String line) { return stateDir.resolve("readback-" + line + ".json"); }

    RecordLog.Position at(Path recordsDir) { return new RecordLog.Position(recordsDir.resolve(file), offset); }

    RecordLog.Position bookFrom(Path recordsDir) { return new RecordLog.Position(recordsDir.resolve(bookFile), bookOffset); }

    /** Writes {@code t} atomically (temp file + rename; no fsync: a checkpoint lost to a power cut only costs a longer start). */
    static void write(Path stateDir, String line, Taken t) throws IOException {
        RecordLog.Position end = t.cut().end(), from = t.cut().from();
        int n = (int) Math.min(CRC_BYTES, end.offset());
        var c = new ReadBackCheckpoint(FORMAT, line, t.fingerprint(), end.file().getFileName().toString(), end.offset(),
                crc(end.file(), end.offset(), n), n, from.file().getFileName().toString(), from.offset(), t.cut().lastRow().toString(),
                t.bookLot(), t.stats().get(), t.monitor());
        Path f = file(stateDir, line), tmp = f.resolveSibling(f.getFileName() + ".tmp");
        Files.createDirectories(stateDir);
        Files.write(tmp, Json.mapper().writeValueAsBytes(c));
        Files.move(tmp, f, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
    }

    /**
     * The line's checkpoint when it can be used as it is (see the class), else null with the reason logged. A state
     * that this version cannot take up (checked on scratch figures and a scratch monitor) is not used either.
     */
    static ReadBackCheckpoint load(Path stateDir, String line, String fingerprint, Path recordsDir, int deadlineMs,
                                   java.util.function.Supplier<LineEngine> scratchEngine) {
        Path f = file(stateDir, line);
        if (!Files.exists(f)) return null;
        String why;
        try {
            // every field present: a file whose state lacks one (another version's) is not read as zeros
            ReadBackCheckpoint c = Json.mapper().readerFor(ReadBackCheckpoint.class)
                    .with(com.fasterxml.jackson.databind.DeserializationFeature.FAIL_ON_MISSING_CREATOR_PROPERTIES).readValue(f.toFile());
            Path data = recordsDir.resolve(c.file());
            if (c.format() != FORMAT) why = "format " + c.format() + ", this version reads " + FORMAT;
            else if (!line.equals(c.line()) || !fingerprint.equals(c.fingerprint())) why = "taken under another recipe or settings";
            else if (!Files.isRegularFile(data)) why = "its record file " + data + " is gone";
            else if (Files.size(data) < c.offset()) why = "its record file " + data + " is shorter than it was (" + Files.size(data) + " < " + c.offset() + " bytes)";
            else if (crc(data, c.offset(), c.crcBytes()) != c.crc32()) why = "its record file " + data + " holds other bytes than it did";
            else if (!Files.isRegularFile(recordsDir.resolve(c.bookFile()))) why = "the record file " + c.bookFile() + " is gone";
            else {
                new LineStats(Clock.systemUTC(), deadlineMs).restore(c.stats());
                scratchEngine.get().restore(c.monitor());
                java.time.Instant.parse(c.lastRowAt());
                return c;
            }
        } catch (IOException | RuntimeException e) {
            why = "unreadable (" + e.getMessage() + ")";
        }
        LOG.info("read-back checkpoint {} not used, the record log is read back in full: {}", f, why);
        return null;
    }

    /** CRC-32 of the {@code n} bytes before {@code end} in {@code file}. */
    static long crc(Path file, long end, int n) throws IOException {
        ByteBuffer b = ByteBuffer.allocate(n);
        try (FileChannel ch = FileChannel.open(file, StandardOpenOption.READ)) {
            while (b.hasRemaining()) if (ch.read(b, end - n + b.position()) < 0) throw new IOException(file + ": ends before byte " + end);
        }
        var crc = new java.util.zip.CRC32();
        crc.update(b.flip());
        return crc.getValue();
    }
}
