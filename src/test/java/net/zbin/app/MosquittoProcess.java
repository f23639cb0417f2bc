package net.zbin.app;

import java.io.IOException;
import java.net.InetSocketAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.concurrent.TimeUnit;

/** A Mosquitto broker started by the test from a generated config on a free port (never the system service). */
public final class MosquittoProcess implements AutoCloseable {
    public final int port;
    private final Path dir;
    private final Path conf;
    private Process process;

    /** @param extraConfig further mosquitto.conf lines (password_file, acl_file, …) */
    public MosquittoProcess(Path dir, String extraConfig) throws IOException, InterruptedException {
        port = freePort();
        this.dir = dir;
        conf = dir.resolve("mosquitto-" + port + ".conf");
        Files.writeString(conf, "listener " + port + " 127.0.0.1\n"
                + "set_tcp_nodelay true\n"
                + (extraConfig.contains("persistence") ? "" : "persistence false\n")
                + "max_queued_messages 20000\n"
                + "log_dest stderr\n"
                + (extraConfig.contains("allow_anonymous") ? "" : "allow_anonymous true\n")
                + extraConfig);
        start();
    }

    /** The broker's process id (for its CPU time in /proc). */
    public long pid() { return process.pid(); }

    /** Starts (again) on the same port from the same config, and waits until it listens. */
    public void start() throws IOException, InterruptedException {
        process = new ProcessBuilder("mosquitto", "-c", conf.toString()).redirectErrorStream(true)
                .redirectOutput(ProcessBuilder.Redirect.appendTo(dir.resolve("mosquitto-" + port + ".log").toFile())).start();
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(10);
        while (true) {
            try (Socket s = new Socket()) {
                s.connect(new InetSocketAddress("127.0.0.1", port), 200);
                return;
            } catch (IOException e) {
                if (!process.isAlive()) throw new IllegalStateException("mosquitto exited: " + Files.readString(dir.resolve("mosquitto-" + port + ".log")));
                if (System.nanoTime() > end) throw new IllegalStateException("mosquitto did not listen on " + port);
                Thread.sleep(50);
            }
        }
    }

    public String url() { return "tcp://127.0.0.1:" + port; }

    /** Kills the broker at once (SIGKILL), as a crash or a power cut of its host would. */
    public void kill() throws InterruptedException {
        process.destroyForcibly();
        process.waitFor(5, TimeUnit.SECONDS);
    }

    static int freePort() throws IOException {
        try (ServerSocket s = new ServerSocket(0)) {
            return s.getLocalPort();
        }
    }

    /** Stops the broker the orderly way (SIGTERM): it closes every connection and saves what it persists. */
    public void stop() throws InterruptedException {
        process.destroy();
        if (!process.waitFor(5, TimeUnit.SECONDS)) process.destroyForcibly();
    }

    @Override
    public void close() throws InterruptedException { stop(); }
}
