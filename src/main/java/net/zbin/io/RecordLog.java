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
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import net.zbin.core.Decision;
import net.zbin.core.Grading;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVPrinter;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The record log (contract, see the README's record log section): one CSV row per decision, appended by its own thread so
 * that the handler's answer never waits on the disk. Rows are flushed and forced to disk at least
 * every {@code flushMs}, so a kill -9 loses at most that interval. A torn last line (the process
 * died mid-row) is cut off when the file is reopened, so no row ever reads back wrong. Files rotate
 * by UTC day and by size: {@code <line>-<yyyy-mm-dd>.csv}, then {@code .1.csv}, {@code .2.csv}, …
 * When writing fails, rows are kept in memory and retried; the listener hears of the failure and
 * of the recovery.
 */
public final class RecordLog implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(RecordLog.class);
    private static final int QUEUE = 1 << 20;
    private static final CSVFormat FORMAT = CSVFormat.DEFAULT.builder().setRecordSeparator("\n").get();
    private static final String HEADER = String.join(",", RecordColumns.ALL) + "\n";

    /** One decision with when it was made. */
    public record Row(Instant time, String line, Decision decision) {}

    /** Told when the log stops being writable, and when it is again. Called on the log thread. */
    public interface Listener {
        void failed(String message);

        void recovered();
    }

    private final LineConfig.RecordSettings settings;
    private final String line;
    private final Listener listener;
    private final LinkedBlockingQueue<Row> queue = new LinkedBlockingQueue<>(QUEUE);
    private final ArrayDeque<Row> pending = new ArrayDeque<>();
    private final AtomicLong written = new AtomicLong();
    private final AtomicLong dropped = new AtomicLong();
    private final Thread thread;
    private volatile boolean running = true;
    private FileChannel channel;
    private CSVPrinter printer;
    private Path current;
    private LocalDate day;
    private boolean failing;

    public RecordLog(LineConfig.RecordSettings settings, String line, Listener listener) {
        this.settings = settings;
        this.line = line;
        this.listener = listener;
        this.thread = new Thread(this::run, "record-log");
        thread.setDaemon(true);
    }

    public void start() { thread.start(); }

    /** Queues a row; never blocks. False (and counted) only when a million rows are already waiting. */
    public boolean offer(Row r) {
        if (queue.offer(r)) return true;
        dropped.incrementAndGet();
        return false;
    }

    public long written() { return written.get(); }

    public long dropped() { return dropped.get(); }

    /** Rows accepted but not yet on disk. */
    public int backlog() { return queue.size() + pending.size(); }

    private void run() {
        long lastFlush = System.nanoTime();
        List<Row> batch = new ArrayList<>();
        while (running || !queue.isEmpty()) {
            try {
                Row first = queue.poll(Math.max(1, settings.flushMs()), TimeUnit.MILLISECONDS);
                if (first != null) {
                    pending.add(first);
                    queue.drainTo(batch);
                    pending.addAll(batch);
                    batch.clear();
                }
            } catch (InterruptedException e) {
                running = false;
            }
            long now = System.nanoTime();
            if (!pending.isEmpty() && (settings.flushMs() == 0 || now - lastFlush >= settings.flushMs() * 1_000_000L || !running)) {
                writePending();
                lastFlush = now;
            }
        }
        writePending();
        closeFile();
    }

    private void writePending() {
        if (pending.isEmpty()) return;
        try {
            while (!pending.isEmpty()) {
                Row r = pending.peek();
                ensureFile(r.time());
                printer.printRecord(values(r));
                pending.poll();
                written.incrementAndGet();
            }
            printer.flush();
            channel.force(false);
            if (channel.size() >= settings.rotateBytes()) closeFile();
            if (failing) {
                failing = false;
                LOG.info("record log writable again: {}", current);
                listener.recovered();
            }
        } catch (IOException | RuntimeException e) {
            closeFile();
            if (!failing) {
                failing = true;
                LOG.error("record log cannot be written: {}", e.toString());
                listener.failed("record log cannot be written in " + settings.dir() + ": " + e.getMessage());
            }
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

    static List<Object> values(Row r) {
        Decision d = r.decision();
        Grading g = d.grading();
        List<Object> v = new ArrayList<>(RecordColumns.ALL.size());
        v.add(r.time().toString());
        v.add(r.line());
        v.add(d.lot());
        v.add(d.seq());
        v.add(d.part());
        v.add(d.kind());
        v.add(d.recipe());
        v.add(num(g.freqHz()));
        v.add(num(g.rOhm()));
        v.add(num(g.xOhm()));
        v.add(num(g.rawROhm()));
        v.add(num(g.rawXOhm()));
        v.add(g.model() == null ? "" : g.model().key());
        v.add(g.param() == null ? "" : g.param().label());
        v.add(num(g.value()));
        v.add(num(g.devPct()));
        v.add(num(g.d()));
        v.add(num(g.q()));
        v.add(num(g.esrOhm()));
        v.add(num(g.thetaDeg()));
        v.add(g.bin());
        v.add(g.grade());
        v.add(g.verdict().key());
        v.add(g.reason());
        v.add(num(d.latencyMs()));
        v.add(g.comp().key());
        v.add(d.attempt());
        return v;
    }

    private static String num(double v) { return Double.isFinite(v) ? Double.toString(v) : ""; }

    /** Stops after writing everything queued. */
    @Override
    public void close() {
        running = false;
        try {
            thread.join(10_000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

}
