package net.zbin.io;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.channels.FileLock;
import java.nio.channels.OverlappingFileLockException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Instant;

/**
 * One line, one daemon: an operating-system lock on a file in the line's folder, held while the daemon runs.
 * A second daemon for the same line (a second unit, a manual start) cannot take it and is told which process
 * holds it. The lock goes with the process, so a kill -9 leaves nothing to clean up.
 */
public final class LineLock implements AutoCloseable {
    private final FileChannel channel;
    private final FileLock lock;
    private final Path file;

    /** Another process (or this one) holds the line. */
    public static final class Taken extends Exception {
        public Taken(String message) { super(message); }
    }

    private LineLock(FileChannel channel, FileLock lock, Path file) {
        this.channel = channel;
        this.lock = lock;
        this.file = file;
    }

    /** Takes the lock of {@code line} in {@code dir} (created if missing), or says who holds it. */
    public static LineLock acquire(Path dir, String line) throws IOException, Taken {
        Files.createDirectories(dir);
        Path file = dir.resolve(".zbin-" + line + ".lock");
        FileChannel ch = FileChannel.open(file, StandardOpenOption.CREATE, StandardOpenOption.READ, StandardOpenOption.WRITE);
        FileLock l;
        try {
            l = ch.tryLock();
        } catch (OverlappingFileLockException e) {
            l = null; // this very process holds it already
        }
        if (l == null) {
            String holder = Files.readString(file, StandardCharsets.UTF_8).strip();
            ch.close();
            throw new Taken("line '" + line + "' is already served by " + (holder.isEmpty() ? "another process" : holder)
                    + " (lock " + file + "): one line, one daemon — stop that one first");
        }
        String me = "process " + ProcessHandle.current().pid() + " on " + host() + " since " + Instant.now();
        ch.truncate(0);
        ch.write(ByteBuffer.wrap(me.getBytes(StandardCharsets.UTF_8)), 0);
        ch.force(false);
        return new LineLock(ch, l, file);
    }

    private static String host() {
        try {
            return java.net.InetAddress.getLocalHost().getHostName();
        } catch (IOException e) {
            return "this host";
        }
    }

    public Path file() { return file; }

    @Override
    public void close() {
        try {
            lock.release();
            channel.close();
        } catch (IOException ignored) {
            // the process is stopping: the lock goes with the channel
        }
    }
}
