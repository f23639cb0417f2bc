package net.zbin.app;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

/**
 * Starts {@code zbin run} as a process of its own, for the benches that measure the daemon as it is deployed rather than
 * inside their own JVM (whose compiler, collector and other threads would share its tail).
 */
final class UnitProcess {
    private UnitProcess() {}

    /**
     * The daemon's process, its output in {@code dir/daemon-<name>.log}. {@code how}: {@code unit} (the systemd unit's
     * {@code java} options, {@code -jar}, and the class-data {@code archive} when not null: {@code -XX:ArchiveClassesAtExit}
     * while it does not exist yet, the process writes it when it stops), {@code jar} (the jar alone) or {@code classes}
     * (this JVM's own class path). The jar is {@code zbin.bench.daemon.jar}, else the build's {@code target/zbin.jar};
     * options in {@code zbin.bench.daemon.jvm} go before the others (e.g. {@code -Xlog:class+load}).
     */
    static Process start(Path dir, Path cfg, String name, String how, Path archive) throws Exception {
        List<String> cmd = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString()));
        String extra = System.getProperty("zbin.bench.daemon.jvm", "");
        if (!extra.isBlank()) cmd.addAll(List.of(extra.trim().split("\\s+")));
        String jar = System.getProperty("zbin.bench.daemon.jar", "");
        switch (how) {
            case "unit" -> {
                cmd.addAll(MosquittoAndSystemdFiles.unitJvmOptions(Path.of("config/systemd/zbin@.service")));
                if (archive != null) cmd.add((Files.exists(archive) ? "-XX:SharedArchiveFile=" : "-XX:ArchiveClassesAtExit=") + archive);
                cmd.addAll(List.of("-jar", jar.isBlank() ? Jar.path() : jar));
            }
            case "jar" -> cmd.addAll(List.of("-jar", jar.isBlank() ? Jar.path() : jar));
            case "classes" -> cmd.addAll(List.of("-cp", System.getProperty("java.class.path"), "net.zbin.app.Main"));
            default -> throw new IllegalArgumentException("zbin.bench.daemon.start: '" + how + "' is not one of unit, jar, classes");
        }
        cmd.addAll(List.of("run", "--config", cfg.toString()));
        return new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(dir.resolve("daemon-" + name + ".log").toFile()).start();
    }

    /** SIGTERM (a clean stop), forcibly when it takes more than 20 s. */
    static void stop(Process daemon) throws InterruptedException {
        daemon.destroy();
        if (!daemon.waitFor(20, java.util.concurrent.TimeUnit.SECONDS)) daemon.destroyForcibly().waitFor(10, java.util.concurrent.TimeUnit.SECONDS);
    }
}
