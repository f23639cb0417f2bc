package net.zbin.app;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.stream.Stream;

/** Writes a line config into a temp folder, with the shipped recipes and meter profile beside it. */
public final class TestLine {
    private TestLine() {}

    /** The tests' record-log {@code flush_ms}: rows on disk soon after a part. */
    public static final int FLUSH_MS = 50;

    public static Path write(Path dir, String line, String broker, int meterPort, String extra) throws IOException {
        return write(dir, line, broker, meterPort, extra, FLUSH_MS);
    }

    /**
     * @param flushMs the record log's {@code flush_ms}; null leaves the key out (the shipped default, what the benches
     *                measure). The tests' {@link #FLUSH_MS} forces the file four times as often as a line does by
     *                default.
     */
    public static Path write(Path dir, String line, String broker, int meterPort, String extra, Integer flushMs) throws IOException {
        Path recipes = dir.resolve("recipes"), meters = dir.resolve("meters");
        Files.createDirectories(recipes);
        Files.createDirectories(meters);
        try (Stream<Path> s = Files.list(Path.of("config/recipes"))) {
            for (Path p : s.toList()) Files.copy(p, recipes.resolve(p.getFileName()), java.nio.file.StandardCopyOption.REPLACE_EXISTING);
        }
        Files.copy(Path.of("config/meters/zbin-sim.yaml"), meters.resolve("zbin-sim.yaml"), java.nio.file.StandardCopyOption.REPLACE_EXISTING);
        Path cfg = dir.resolve(line + ".yaml");
        Files.writeString(cfg, "line: " + line + "\n"
                + "mqtt: {broker: '" + broker + "', topic_root: zbin}\n"
                + "meter:\n  profile: meters/zbin-sim.yaml\n  transport: {tcp: {host: 127.0.0.1, port: " + meterPort + "}}\n"
                + "recipes: {dir: recipes, active: mlcc-x7r-100n}\n"
                + "state_dir: state-" + line + "\n"
                + "records: {dir: records-" + line + (flushMs == null ? "" : ", flush_ms: " + flushMs) + "}\n"
                + extra);
        return cfg;
    }

    /**
     * The CPU this process may run on that serves the fewest devices' interrupts (the last of equals); null where that is
     * unknown: where a line with a CPU of its own belongs.
     */
    public static Integer quietCpu() {
        return net.zbin.app.daemon.CpuPin.quietest(net.zbin.app.daemon.CpuPin.interruptTable(), net.zbin.app.daemon.CpuPin.allowedHere());
    }

    /** Adds keys to the config's {@code mqtt:} map (written by {@link #write}), e.g. {@code "keepalive_s: 2"}. */
    public static void mqttKeys(Path cfg, String keys) throws IOException {
        String text = Files.readString(cfg);
        if (!text.contains("topic_root: zbin}")) throw new IllegalStateException(cfg + ": not a config written by TestLine.write");
        Files.writeString(cfg, text.replace("topic_root: zbin}", "topic_root: zbin, " + keys + "}"));
    }

    /**
     * Waits (bounded: 3 minutes, polling every 10 ms) until a running handler simulator has presented {@code n} parts;
     * fails when its run ended first or the bound passes.
     */
    static void awaitParts(java.util.concurrent.atomic.AtomicLong parts, long n, java.util.concurrent.Future<?> run) throws Exception {
        long end = System.nanoTime() + java.util.concurrent.TimeUnit.MINUTES.toNanos(3);
        while (parts.get() < n) {
            if (run.isDone()) {
                run.get(); // its failure, if any
                throw new AssertionError("the handler's run ended at part " + parts.get() + " before part " + n);
            }
            if (System.nanoTime() > end) throw new AssertionError("the handler reached part " + parts.get() + " of " + n + " within 3 minutes");
            java.util.concurrent.locks.LockSupport.parkNanos(10_000_000L);
        }
    }
}
