package net.zbin.io.meter;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.concurrent.TimeUnit;

/**
 * A real pseudo-terminal pair made by socat: two device links in a temp directory. Fails (never
 * skips) when socat is missing, so CI cannot pass without the serial path.
 */
public final class PtyPair implements AutoCloseable {
    public final Path a;
    public final Path b;
    private final Process socat;

    public PtyPair(Path dir) throws IOException, InterruptedException {
        a = dir.resolve("ttyZbin");
        b = dir.resolve("ttySim");
        socat = new ProcessBuilder("socat", "pty,raw,echo=0,link=" + a, "pty,raw,echo=0,link=" + b)
                .redirectErrorStream(true).redirectOutput(dir.resolve("socat.log").toFile()).start();
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(10);
        while (!(Files.exists(a) && Files.exists(b))) {
            if (!socat.isAlive()) throw new IllegalStateException("socat exited: " + Files.readString(dir.resolve("socat.log")));
            if (System.nanoTime() > end) throw new IllegalStateException("socat did not create the pty links");
            Thread.sleep(20);
        }
    }

    @Override
    public void close() throws InterruptedException {
        socat.destroy();
        socat.waitFor(5, TimeUnit.SECONDS);
    }
}
