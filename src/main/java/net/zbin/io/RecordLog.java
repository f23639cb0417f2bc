package net.zbin.io;

import java.io.IOException;
import java.io.RandomAccessFile;
import java.nio.ByteBuffer;
import java.nio.channels.ClosedChannelException;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Instant;
import java.time.LocalDate;
import java.time.ZoneOffset;
import java.util.ArrayDeque;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import net.zbin.core.Reason;
import org.apache.commons.csv.CSVFormat;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The record log (contract, see the README's record log section): one CSV row per decision. A row is
 * written to the operating system by {@link #write} before its decision is published — one write call,
 * not an fsync — so a kill -9 of the process loses no row the handler acted on; a timer thread forces
 * the file to disk every {@code flushMs} without holding what {@code write} needs, so the trigger path never
 * waits on the disk's flush. A torn last line (the machine died mid-row) is cut off when the file is reopened,
 * so no row ever reads back wrong. Files rotate by UTC day and by size: {@code <line>-<yyyy-mm-dd>.csv},
 * then {@code .1.csv}, {@code .2.csv}, …
 *
 * <p>When writing fails, {@link #keep} holds rows in memory, encoded, and the timer retries them in order: rows
 * of measured decisions up to {@link #MAX_MEASURED_BYTES}, answers that measured nothing up to
 * {@link #MAX_UNMEASURED_BYTES} (a handler that re-presents at once while the line is paused must not fill the
 * memory, nor the disk when space returns); beyond that rows are dropped and counted. The listener hears of the
 * failure and of the recovery. Thread-safe: the measuring thread and the overflow answerer write.
 */
public final class RecordLog implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(RecordLog.class);
    /** Bytes of kept rows of measured decisions at most (16 MiB ≈ 60 000 rows). */
    public static final long MAX_MEASURED_BYTES = 16L << 20;
    /** Bytes of kept rows of answers that measured nothing at most (256 KiB ≈ 2 000 such rows). */
    public static final long MAX_UNMEASURED_BYTES = 256L << 10;
    /** While failing, the timer retries at least this often, whatever the flush interval. */
    private static final long RETRY_MS = 200;
    private static final CSVFormat FORMAT = CSVFormat.DEFAULT.builder().setRecordSeparator("\n").get();
    private static final String HEADER = String.join(",", RecordColumns.ALL) + "\n";

    /** Told when the log stops being writable, and when it is again. Must not block. */
    public interface Listener {
        void failed(String message);

        void recovered();
    }

    /** A row waiting to be written, encoded already. */
    private record Kept(Instant time, byte[] row, boolean measured) {}

    /** A place in the log: a file and a byte offset in it that starts a row (or ends the file). */
    public record Position(Path file, long offset) {
        public Position {
            java.util.Objects.requireNonNull(file, "file");
            if (offset < 0) throw new IllegalArgumentException("offset: must be >= 0 (was " + offset + ")");
        }
    }

    /**
     * Where the log stands: {@code end} just after the last row written, {@code from} the first row written in the
     * second {@code spanMs} before that row's (at the latest), and the last row's time.
     */
    public record Cut(Position end, Position from, Instant lastRow) {}

    /** The first row written in a second, where it went. */
    private record Mark(long second, Path file, long offset) {}

    /** Marks of the last {@link #MARK_SPAN_S} seconds of rows written, oldest first: one per second that had rows. */
    private final ArrayDeque<Mark> marks = new ArrayDeque<>();
    private static final long MARK_SPAN_S = 7200;
    private Instant lastRowTime;
    /** The last row the log held before this run wrote any (read back at the start), or null: none. */
    private Instant priorLastRow;

    private final LineConfig.RecordSettings settings;
    private final String line;
    private final Listener listener;
    private final ArrayDeque<Kept> backlog = new ArrayDeque<>();
    private final AtomicLong written = new AtomicLong();
    private final AtomicLong dropped = new AtomicLong();
    private final java.util.concurrent.ScheduledExecutorService timer;
    private long measuredBytes, unmeasuredBytes;
    private long droppedMeasured, tornCutsWhileFailing;
    private FileChannel channel;
    /** Bytes in {@link #channel}'s file: kept here, so a row costs one system call (its write), not a second to ask the size. */
    private long fileBytes;
    private Path current;
    private LocalDate day;
    private long lastForceNanos = System.nanoTime();
    private boolean failing, dirty, closed;

    public RecordLog(LineConfig.RecordSettings settings, String line, Listener listener) {
        this.settings = settings;
        this.line = line;
        this.listener = listener == null ? new Listener() {
            public void failed(String message) { }

            public void recovered() { }
        } : listener;
        this.timer = java.util.concurrent.Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "record-log-" + line);
            t.setDaemon(true);
            return t;
        });
    }

    public void start() {
        long period = Math.max(1, Math.min(settings.flushMs(), RETRY_MS));
        timer.scheduleWithFixedDelay(FatalErrors.surfaced(this::tick), period, period, TimeUnit.MILLISECONDS);
    }

    /**
     * Opens the file of {@code now}'s day ahead of the first row (at start, before the line says ready), so the first
     * part does not pay for the open. A failure here is not reported: the first write will be, with its decision.
     */
    public synchronized void prepare(Instant now) {
        if (closed || failing) return;
        try {
            ensureFile(now);
        } catch (IOException | RuntimeException e) {
            LOG.debug("record log not opened ahead: {}", e.toString());
        }
    }

    /** The row's bytes as they go to the file (free-text cells spreadsheet-safe, see {@link DecisionFields#row}). */
    public static byte[] encode(net.zbin.core.DecisionEvent e) {
        return (FORMAT.format((Object[]) DecisionFields.row(e)) + "\n").getBytes(StandardCharsets.UTF_8);
    }

    /**
     * Writes a row through to the operating system. False when it did not get there (the log is failing, or
     * rows are kept from a failure): the caller decides what to answer and then {@link #keep}s the row it answered.
     */
    public boolean write(net.zbin.core.DecisionEvent e) {
        byte[] row = encode(e);
        synchronized (this) {
            if (closed) throw new IllegalStateException("record log closed");
            if (failing || !backlog.isEmpty()) return false;
            try {
                writeRow(e.time(), row);
                return true;
            } catch (IOException | RuntimeException ex) {
                fail(ex);
                return false;
            }
        }
    }

    /**
     * Keeps a row that {@link #write} could not write, to be written in order when the log is writable again;
     * beyond the byte bound of its class it is dropped and counted.
     */
    public void keep(net.zbin.core.DecisionEvent e) {
        byte[] row = encode(e);
        boolean measured = e.decision().grading().reason().kind() != Reason.Kind.NOT_MEASURED;
        synchronized (this) {
            if (closed) throw new IllegalStateException("record log closed");
            long used = measured ? measuredBytes : unmeasuredBytes;
            if (used + row.length > (measured ? MAX_MEASURED_BYTES : MAX_UNMEASURED_BYTES)) {
                dropped.incrementAndGet();
                if (measured) droppedMeasured++;
                return;
            }
            if (measured) measuredBytes += row.length;
            else unmeasuredBytes += row.length;
            backlog.add(new Kept(e.time(), row, measured));
        }
    }

    /** {@link #write}, and {@link #keep} when that fails: for callers whose answer does not depend on it. */
    public boolean append(net.zbin.core.DecisionEvent e) {
        if (write(e)) return true;
        keep(e);
        return false;
    }

    /**
     * Where the log stands, for a checkpoint of what its rows built up; null while rows are kept from a failure (the
     * file is not every row handed over), before this log wrote a row, or when the rows it wrote do not reach back
     * {@code spanMs} before the last one and rows of an earlier run ({@link #priorLastRow}) fall in that span (their
     * place in the file is not known here).
     */
    public synchronized Cut cut(long spanMs) {
        if (failing || !backlog.isEmpty() || current == null || lastRowTime == null || marks.isEmpty()) return null;
        long fromSecond = Math.floorDiv(lastRowTime.toEpochMilli() - spanMs, 1000L);
        boolean priorBefore = priorLastRow == null || priorLastRow.getEpochSecond() < fromSecond;
        if (marks.peekFirst().second() >= fromSecond && !priorBefore) return null;
        Mark m = null;
        for (var it = marks.descendingIterator(); it.hasNext(); ) {
            Mark k = it.next();
            if (k.second() < fromSecond) break;
            m = k;
        }
        Position end = new Position(current, fileBytes);
        return new Cut(end, m == null ? end : new Position(m.file(), m.offset()), lastRowTime);
    }

    /** The last row the log held before this run (read back at the start; null: none), for {@link #cut}. */
    public synchronized void priorLastRow(Instant t) { priorLastRow = t; }

    public long written() { return written.get(); }

    /** Rows dropped because the kept rows reached their bound while the log could not be written. */
    public long dropped() { return dropped.get(); }

    /** Rows kept but not yet written. */
    public synchronized int backlog() { return backlog.size(); }

    /** Bytes of the rows kept but not yet written. */
    public synchronized long backlogBytes() { return measuredBytes + unmeasuredBytes; }

    /** True while the log cannot be written. */
    public synchronized boolean failing() { return failing; }

    /** Writes one encoded row through to the operating system (no fsync); rotates past the size limit. */
    private void writeRow(Instant time, byte[] row) throws IOException {
        ensureFile(time);
        long second = time.getEpochSecond();
        if (marks.isEmpty() || marks.peekLast().second() != second) {
            marks.addLast(new Mark(second, current, fileBytes));
            while (marks.size() > 1 && (marks.peekFirst().second() < second - MARK_SPAN_S || marks.size() > MARK_SPAN_S * 2)) marks.pollFirst();
        }
        lastRowTime = time;
        ByteBuffer b = ByteBuffer.wrap(row);
        while (b.hasRemaining()) channel.write(b);
        fileBytes += row.length;
        written.incrementAndGet();
        dirty = true;
        if (fileBytes >= settings.rotateBytes()) closeFile();
    }

    /**
     * The timer: retries kept rows in order, then forces written rows to disk every {@code flushMs} — outside
     * the lock, so a row can be written while the disk flushes (a concurrent write and force on one channel is
     * safe; the forced data is at least what was written before the call).
     */
    void tick() {
        FileChannel toForce = null;
        synchronized (this) {
            if (!drainBacklog()) return;
            long now = System.nanoTime();
            if (dirty && channel != null && now - lastForceNanos >= settings.flushMs() * 1_000_000L) {
                toForce = channel;
                dirty = false;
                lastForceNanos = now;
            }
        }
        if (toForce == null) return;
        try {
            toForce.force(false);
        } catch (ClosedChannelException e) {
            // rotated or closed meanwhile: closing forced it
        } catch (IOException e) {
            synchronized (this) {
                fail(e);
            }
        }
    }

    /** Writes the kept rows; true when none is left (and the log is writable). Holds the lock. */
    private boolean drainBacklog() {
        if (!failing && backlog.isEmpty()) return true;
        try {
            if (backlog.isEmpty()) ensureFile(Instant.now()); // nothing kept: is the folder writable again?
            while (!backlog.isEmpty()) {
                Kept k = backlog.peek();
                writeRow(k.time(), k.row());
                backlog.poll();
                if (k.measured()) measuredBytes -= k.row().length;
                else unmeasuredBytes -= k.row().length;
            }
        } catch (IOException | RuntimeException e) {
            fail(e);
            return false;
        }
        if (failing) {
            failing = false;
            LOG.info("record log writable again: {}{}{}", current,
                    dropped.get() > 0 ? "; " + dropped.get() + " rows were dropped in all while it was not (" + droppedMeasured + " of measured decisions)" : "",
                    tornCutsWhileFailing > 1 ? "; a torn last line was cut off " + tornCutsWhileFailing + " times meanwhile" : "");
            tornCutsWhileFailing = 0;
            listener.recovered();
        }
        return true;
    }

    private void fail(Exception e) {
        closeFile();
        if (!failing) {
            failing = true;
            LOG.error("record log cannot be written: {}", e.toString());
            listener.failed("record log cannot be written in " + settings.dir() + ": " + e.getMessage());
        }
    }

    private void ensureFile(Instant t) throws IOException {
        LocalDate d = LocalDate.ofInstant(t, ZoneOffset.UTC);
        if (channel != null && d.equals(day)) return;
        closeFile();
        Files.createDirectories(settings.dir());
        for (int i = 0; ; i++) {
            Path p = settings.dir().resolve(line + "-" + d + (i == 0 ? "" : "." + i) + ".csv");
            Path next = settings.dir().resolve(line + "-" + d + "." + (i + 1) + ".csv");
            if (Files.exists(next)) continue;
            if (Files.exists(p) && (Files.size(p) >= settings.rotateBytes() || !headerMatches(p))) continue;
            open(p);
            day = d;
            return;
        }
    }

    private static boolean headerMatches(Path p) throws IOException {
        if (Files.size(p) == 0) return true;
        byte[] want = HEADER.getBytes(StandardCharsets.US_ASCII);
        try (RandomAccessFile raf = new RandomAccessFile(p.toFile(), "r")) {
            if (raf.length() < want.length) return false;
            byte[] got = new byte[want.length];
            raf.readFully(got);
            return java.util.Arrays.equals(want, got);
        }
    }

    private void open(Path p) throws IOException {
        FileChannel ch = FileChannel.open(p, StandardOpenOption.CREATE, StandardOpenOption.WRITE, StandardOpenOption.READ);
        try {
            long cut = cutTornTail(ch);
            if (cut > 0) {
                if (!failing) LOG.warn("record log {} had a torn last line ({} bytes), cut off", p, cut);
                else if (tornCutsWhileFailing++ == 0) LOG.warn("record log {} had a torn last line ({} bytes), cut off "
                        + "(while the log cannot be written this repeats at each retry: counted, not logged again)", p, cut);
            }
            ch.position(ch.size());
            if (ch.size() == 0) {
                ByteBuffer h = ByteBuffer.wrap(HEADER.getBytes(StandardCharsets.US_ASCII));
                while (h.hasRemaining()) ch.write(h);
            }
            fileBytes = ch.position();
            channel = ch;
            current = p;
        } catch (IOException e) {
            ch.close();
            throw e;
        }
    }

    /** Truncates a file back to just after its last newline: a half-written row is never kept. Returns the bytes cut. */
    static long cutTornTail(FileChannel ch) throws IOException {
        long size = ch.size();
        if (size == 0) return 0;
        ByteBuffer one = ByteBuffer.allocate(1);
        long pos = size - 1;
        ch.read(one, pos);
        if (one.get(0) == '\n') return 0;
        while (pos > 0) {
            one.clear();
            ch.read(one, pos - 1);
            if (one.get(0) == '\n') break;
            pos--;
        }
        ch.truncate(pos);
        return size - pos;
    }

    private void closeFile() {
        if (channel == null) return;
        try {
            channel.force(false);
        } catch (IOException e) {
            LOG.debug("forcing record log at close: {}", e.toString());
        }
        try {
            channel.close();
        } catch (IOException ignored) {
            // already reported
        }
        channel = null;
    }

    /** Stops after writing and forcing everything kept; says what could not be written. */
    @Override
    public void close() {
        timer.shutdown();
        try {
            timer.awaitTermination(5, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        synchronized (this) {
            drainBacklog();
            closeFile();
            closed = true;
            if (!backlog.isEmpty()) {
                long measured = backlog.stream().filter(Kept::measured).count();
                LOG.error("record log stopped while it could not be written: {} rows kept in memory are lost ({} of them measured "
                        + "decisions)", backlog.size(), measured);
            }
            if (dropped.get() > 0) LOG.warn("record log: {} rows were dropped beyond the memory bound while it could not be written "
                    + "({} of measured decisions)", dropped.get(), droppedMeasured);
        }
    }
}
