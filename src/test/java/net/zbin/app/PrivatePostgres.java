package net.zbin.app;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;

/**
 * A PostgreSQL of the test's own (initdb in a temp folder, pg_ctl on a free port of the loopback), so the test can kill
 * it. PostgreSQL refuses to run as root: as root the server runs as the system's {@code postgres} user.
 */
final class PrivatePostgres implements AutoCloseable {
    final Path dir, data;
    final int port;
    final String admin = "zbin_admin";
    private final boolean small;
    private final boolean root = "root".equals(System.getProperty("user.name"));

    /** Where the data lives when it has a small file system of its own (a tmpfs the test mounts), else null. */
    final Path disk;

    PrivatePostgres() throws Exception { this(null); }

    /**
     * @param diskSize the size of a tmpfs of the server's own for its data (e.g. "120m"; root only), or null: the
     *                 machine's disk. On a small disk the server writes its WAL in 1 MB segments and keeps few.
     */
    PrivatePostgres(String diskSize) throws Exception {
        dir = Files.createTempDirectory("zbin-pg-");
        Files.setPosixFilePermissions(dir, java.nio.file.attribute.PosixFilePermissions.fromString("rwxr-xr-x"));
        if (diskSize != null) {
            disk = Files.createDirectories(dir.resolve("disk"));
            run("mount", "-t", "tmpfs", "-o", "size=" + diskSize, "tmpfs", disk.toString());
            data = disk.resolve("data");
        } else {
            disk = null;
            data = dir.resolve("data");
        }
        small = diskSize != null;
        Files.createDirectories(data);
        if (root) run("chown", "postgres:postgres", data.toString(), dir.toString());
        if (root && disk != null) run("chown", "postgres:postgres", disk.toString());
        try (var s = new java.net.ServerSocket(0)) {
            port = s.getLocalPort();
        }
        if (small) asServer(bin("initdb"), "-D", data.toString(), "-A", "trust", "-U", admin, "--no-sync", "-E", "UTF8", "--wal-segsize=1");
        else asServer(bin("initdb"), "-D", data.toString(), "-A", "trust", "-U", admin, "--no-sync", "-E", "UTF8");
        start();
    }

    void start() throws Exception {
        asServer(bin("pg_ctl"), "-D", data.toString(), "-l", dir.resolve("server.log").toString(), "-w", "-t", "60",
                "-o", "-p " + port + " -k " + dir + " -c listen_addresses=127.0.0.1 -c fsync=off"
                        + (small ? " -c min_wal_size=2MB -c max_wal_size=8MB -c shared_buffers=16MB" : ""), "start");
    }

    /** kill -9 of the server's main process: what a crash of the database host looks like to its clients. */
    void kill9() throws Exception {
        long pid = Long.parseLong(Files.readAllLines(data.resolve("postmaster.pid")).get(0).strip());
        ProcessHandle.of(pid).ifPresent(ProcessHandle::destroyForcibly);
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(30);
        while (ProcessHandle.of(pid).map(ProcessHandle::isAlive).orElse(false) && System.nanoTime() < end) Thread.sleep(20);
        // the server's other processes follow their parent; wait until the port is free again
        while (System.nanoTime() < end) {
            try (var s = new java.net.Socket("127.0.0.1", port)) {
                Thread.sleep(50);
            } catch (IOException gone) {
                return;
            }
        }
    }

    /** A server program: on the PATH, or Debian's newest /usr/lib/postgresql/N/bin. */
    static String bin(String name) throws IOException {
        for (String dirOnPath : System.getenv().getOrDefault("PATH", "").split(":"))
            if (!dirOnPath.isEmpty() && Files.isExecutable(Path.of(dirOnPath, name))) return Path.of(dirOnPath, name).toString();
        try (var versions = Files.list(Path.of("/usr/lib/postgresql"))) {
            return versions.map(v -> v.resolve("bin").resolve(name)).filter(Files::isExecutable)
                    .max(java.util.Comparator.comparingInt(p -> Integer.parseInt(p.getParent().getParent().getFileName().toString().replaceAll("\\D", "0"))))
                    .map(Path::toString).orElseThrow(() -> new IOException(name + " not found: install Debian's postgresql"));
        }
    }

    /** True while the server's main process runs. */
    boolean alive() throws IOException {
        if (!Files.exists(data.resolve("postmaster.pid"))) return false;
        long pid = Long.parseLong(Files.readAllLines(data.resolve("postmaster.pid")).get(0).strip());
        return ProcessHandle.of(pid).map(ProcessHandle::isAlive).orElse(false);
    }

    String url(String db) { return "jdbc:postgresql://127.0.0.1:" + port + "/" + db; }

    Connection connect(String db, String user) throws Exception {
        var p = new java.util.Properties();
        p.setProperty("user", user);
        return DriverManager.getConnection(url(db), p);
    }

    /**
     * A connection once the server is back, starting it again whenever it is found stopped (a server that hit a full
     * disk may still be shutting down when first looked at), within 90 s.
     */
    Connection revive(String db, String user) throws Exception {
        long end = System.nanoTime() + TimeUnit.SECONDS.toNanos(90);
        while (true) {
            try {
                return connect(db, user);
            } catch (java.sql.SQLException e) {
                if (System.nanoTime() > end) throw e;
                if (!alive()) {
                    try {
                        start();
                    } catch (IOException notYet) {
                        // the old server's processes are still going away: look again
                    }
                }
                Thread.sleep(200);
            }
        }
    }

    /** Runs a psql script as the admin (psql's own \connect and all). */
    void psql(Path script) throws Exception {
        run("psql", "-v", "ON_ERROR_STOP=1", "-h", "127.0.0.1", "-p", Integer.toString(port), "-U", admin, "-d", "postgres", "-q", "-f", script.toString());
    }

    private void asServer(String... cmd) throws Exception {
        List<String> c = new ArrayList<>();
        if (root) c.addAll(List.of("runuser", "-u", "postgres", "--"));
        c.addAll(List.of(cmd));
        run(c.toArray(new String[0]));
    }

    static void run(String... cmd) throws Exception {
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes());
        if (!p.waitFor(120, TimeUnit.SECONDS) || p.exitValue() != 0) throw new IOException(String.join(" ", cmd) + " failed: " + out);
    }

    @Override
    public void close() throws Exception {
        try {
            asServer(bin("pg_ctl"), "-D", data.toString(), "-m", "immediate", "-w", "stop");
        } catch (IOException e) {
            // already stopped
        }
        if (disk != null) run("umount", "-l", disk.toString());
        try (var w = Files.walk(dir)) {
            w.sorted(java.util.Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
        }
    }
}
