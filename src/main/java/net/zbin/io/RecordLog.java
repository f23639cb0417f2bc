package net.zbin.io;

import java.io.BufferedWriter;
import java.io.IOException;
import java.io.OutputStreamWriter;
import java.io.RandomAccessFile;
import java.nio.ByteBuffer;
import java.nio.channels.Channels;
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
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVPrinter;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The record log (contract, see the README's record log section): one CSV row per decision. A row is
 * written to the operating system by {@link #append} before its decision is published — a cheap write,
 * not an fsync — so a kill -9 of the process loses no row the handler acted on; a timer thread forces
 * the file to disk every {@code flushMs}, so a power cut loses at most that interval. A torn last line
 * (the machine died mid-row) is cut off when the file is reopened, so no row ever reads back wrong.
 * Files rotate by UTC day and by size: {@code <line>-<yyyy-mm-dd>.csv}, then {@code .1.csv}, {@code .2.csv}, …
 * When writing fails, rows are kept in memory and retried by the timer; the listener hears of the
 * failure and of the recovery. Thread-safe: the measuring thread and the overflow answerer append.
 */
public final class RecordLog implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(RecordLog.class);
    private static final int MAX_PENDING = 1 << 20;
    private static final CSVFormat FORMAT = CSVFormat.DEFAULT.builder().setRecordSeparator("\n").get();
    private static final String HEADER = String.join(",", RecordColumns.ALL) + "\n";

    /** Told when the log stops being writable, and when it is again. Must not block. */
    public interface Listener {
        void failed(String message);

        void recovered();
    }

    private final LineConfig.RecordSettings settings;
    private final String line;
    private final Listener listener;
    private final ArrayDeque<DecisionFields.Entry> pending = new ArrayDeque<>();
    private final AtomicLong written = new AtomicLong();
    private final AtomicLong dropped = new AtomicLong();
    private final java.util.concurrent.ScheduledExecutorService timer;
    private FileChannel channel;
    private CSVPrinter printer;
    private Path current;
    private LocalDate day;
    private boolean failing, dirty, closed;

    public RecordLog(LineConfig.RecordSettings settings, String line, Listener listener) {
        this.settings = settings;
        this.line = line;
        this.listener = listener;
        this.timer = java.util.concurrent.Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "record-log-" + line);
            t.setDaemon(true);
            return t;
        });
    }

    public void start() {
        long period = Math.max(1, settings.flushMs());
        timer.scheduleWithFixedDelay(this::sync, period, period, TimeUnit.MILLISECONDS);
    }

    /**
     * Writes a row through to the operating system. False when the log is failing: the row is then
     * kept in memory (counted as backlog) and written on recovery; beyond a million it is dropped and counted.
     */
    public synchronized boolean append(DecisionFields.Entry r) {
        if (closed) throw new IllegalStateException("record log closed");
        if (!pending.isEmpty() || failing) {
            if (pending.size() >= MAX_PENDING) {
                dropped.incrementAndGet();
                return false;
            }
            pending.add(r);
            return false;
        }
        try {
            writeOne(r);
            dirty = true;
            return true;
        } catch (IOException | RuntimeException e) {
            pending.add(r);
            fail(e);
            return false;
        }
    }

    public long written() { return written.get(); }

    public long dropped() { return dropped.get(); }

    /** Rows accepted but not yet written. */
    public synchronized int backlog() { return pending.size(); }

    /** Writes one row through to the operating system (no fsync); rotates past the size limit. */
    private void writeOne(DecisionFields.Entry r) throws IOException {
        ensureFile(r.time());
        printer.printRecord((Object[]) values(r));
        printer.flush();
        written.incrementAndGet();
        if (channel.size() >= settings.rotateBytes()) closeFile();
    }

    /** The timer: retries kept rows, then forces written rows to disk. */
    synchronized void sync() {
        try {
            while (!pending.isEmpty()) {
                writeOne(pending.peek());
                pending.poll();
                dirty = true;
            }
            if (printer != null && dirty) channel.force(false);
            dirty = false;
            if (failing) {
                failing = false;
                LOG.info("record log writable again: {}", current);
                listener.recovered();
            }
        } catch (IOException | RuntimeException e) {
            fail(e);
        }
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
        if (printer != null && d.equals(day)) return;
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
            cutTornTail(ch);
            ch.position(ch.size());
            if (ch.size() == 0) ch.write(ByteBuffer.wrap(HEADER.getBytes(StandardCharsets.US_ASCII)));
            printer = new CSVPrinter(new BufferedWriter(new OutputStreamWriter(Channels.newOutputStream(ch), StandardCharsets.UTF_8), 1 << 16), FORMAT);
            channel = ch;
            current = p;
        } catch (IOException e) {
            ch.close();
            throw e;
        }
    }

    /** Truncates a file back to just after its last newline: a half-written row is never kept. */
    static void cutTornTail(FileChannel ch) throws IOException {
        long size = ch.size();
        if (size == 0) return;
        ByteBuffer one = ByteBuffer.allocate(1);
        long pos = size - 1;
        ch.read(one, pos);
        if (one.get(0) == '\n') return;
        while (pos > 0) {
            one.clear();
            ch.read(one, pos - 1);
            if (one.get(0) == '\n') break;
            pos--;
        }
        LOG.warn("record log had a torn last line ({} bytes), cut off", size - pos);
        ch.truncate(pos);
    }

    private void closeFile() {
        try {
            if (printer != null) {
                printer.flush();
                channel.force(false);
                printer.close();
            }
        } catch (IOException e) {
            LOG.warn("closing record log: {}", e.toString());
        }
        try {
            if (channel != null) channel.close();
        } catch (IOException ignored) {
            // already reported
        }
        printer = null;
        channel = null;
    }

    static String[] values(DecisionFields.Entry r) { return DecisionFields.row(r); }

    /** Stops after writing and forcing everything kept. */
    @Override
    public void close() {
        timer.shutdown();
        try {
            timer.awaitTermination(5, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        synchronized (this) {
            sync();
            closeFile();
            closed = true;
        }
    }
}
