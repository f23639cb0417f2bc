package net.zbin.app.daemon;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Keeps every thread of this process on one CPU from the moment the line is ready (Linux: the threads' CPU affinity),
 * when the line config asks for it ({@code pin_cpu}).
 *
 * <p>Why: a part crosses five of the daemon's threads (the MQTT client's receiver, callback and sender, the measuring
 * thread, the record log's), and each hand-over wakes a thread. A thread woken on another CPU costs both CPUs an
 * interrupt, and on a virtual machine an exit to the hypervisor; on one CPU it is a plain switch. On the 2-core machine
 * zbin is built on, a pinned line used a fifth less CPU per decision (README, "Reliability and performance"). Before
 * ready the process keeps every CPU: the start's compiling and reading the record log back run in parallel. Threads
 * started later (a reconnect's MQTT threads, the compiler's) inherit the CPU from the thread that starts them. Java
 * cannot set an affinity, {@code taskset} (util-linux) does, for the process's own threads without privilege.
 */
public final class CpuPin {
    private static final Logger LOG = LoggerFactory.getLogger(CpuPin.class);
    private static final Path SELF = Path.of("/proc/self");

    private CpuPin() {}

    /** The CPUs this process may run on, as the kernel lists them ({@code 0-3,6}); null where there is no {@code /proc}. */
    public static String allowedHere() {
        return allowedOf(SELF.resolve("status"));
    }

    /** The {@code Cpus_allowed_list} of a {@code /proc} status file; null when it cannot be read. */
    static String allowedOf(Path status) {
        try {
            for (String l : Files.readAllLines(status)) {
                if (l.startsWith("Cpus_allowed_list:")) return l.substring(l.indexOf(':') + 1).trim();
            }
        } catch (IOException | RuntimeException e) {
            return null;
        }
        return null;
    }

    /**
     * Whether {@code cpu} is in a kernel CPU list ({@code 0-3,6}: ranges and single CPUs, comma-separated).
     *
     * @throws IllegalArgumentException when the list is not one
     */
    public static boolean allows(String list, int cpu) {
        if (list == null || list.isBlank()) return false;
        for (String part : list.trim().split(",")) {
            String[] ends = part.trim().split("-", -1);
            if (ends.length > 2 || ends[0].isEmpty()) throw new IllegalArgumentException("CPU list '" + list + "': '" + part + "' is not a CPU or a range");
            int from = Integer.parseInt(ends[0].trim()), to = ends.length == 2 ? Integer.parseInt(ends[1].trim()) : from;
            if (cpu >= from && cpu <= to) return true;
        }
        return false;
    }

    /**
     * Why this process cannot be pinned to {@code cpu} here, or null when it can: the CPU is not among those it may run
     * on. Unknown (no {@code /proc}) is no objection: {@link #pin} then logs and the line runs unpinned.
     */
    public static String problem(int cpu) {
        String here = allowedHere();
        if (here == null || allows(here, cpu)) return null;
        return "CPU " + cpu + " is not one this process may run on (allowed: " + here + ")";
    }

    /**
     * Sets every thread of this process to run on {@code cpu} only and returns how many of them now do (0 where there is
     * no {@code /proc} or no {@code taskset}: the line runs all the same, and the log says so).
     */
    static int pin(int cpu) {
        if (cpu < 0) throw new IllegalArgumentException("cpu: " + cpu + " is negative");
        String pid = Long.toString(ProcessHandle.current().pid());
        try {
            Process p = new ProcessBuilder(List.of("taskset", "--all-tasks", "--cpu-list", "--pid", Integer.toString(cpu), pid))
                    .redirectErrorStream(true).redirectOutput(ProcessBuilder.Redirect.DISCARD).start();
            if (!p.waitFor(5, TimeUnit.SECONDS)) p.destroyForcibly();
        } catch (IOException e) {
            LOG.warn("pin_cpu: the line runs on every CPU: {}", e.getMessage());
            return 0;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return 0;
        }
        int[] onIt = threadsOn(cpu);
        if (onIt[0] == onIt[1] && onIt[1] > 0) LOG.info("all {} threads of the line on CPU {} from now on", onIt[1], cpu);
        else LOG.warn("pin_cpu: {} of {} threads of the line on CPU {} only", onIt[0], onIt[1], cpu);
        return onIt[0];
    }

    /** {threads allowed on {@code cpu} alone, threads} of this process. */
    static int[] threadsOn(int cpu) {
        int on = 0, all = 0;
        try (var tasks = Files.list(SELF.resolve("task"))) {
            for (Path t : tasks.toList()) {
                String list = allowedOf(t.resolve("status"));
                if (list == null) continue; // the thread ended meanwhile
                all++;
                if (list.equals(Integer.toString(cpu))) on++;
            }
        } catch (IOException e) {
            LOG.debug("{} not listed: {}", SELF.resolve("task"), e.toString());
        }
        return new int[] {on, all};
    }
}
