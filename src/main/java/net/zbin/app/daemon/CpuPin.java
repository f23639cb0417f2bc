package net.zbin.app.daemon;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Keeps every thread of this process on one CPU from the moment the line is ready (Linux: the threads' CPU affinity),
 * when the line config asks for it ({@code pin_cpu}), but for the JIT compiler's, which go to the other CPUs the process
 * may use ({@link #compilerTo}).
 *
 * <p>Why: a part crosses five of the daemon's threads (the MQTT client's receiver, callback and sender, the measuring
 * thread, the record log's), and each hand-over wakes a thread. A thread woken on another CPU costs both CPUs an
 * interrupt, and on a virtual machine an exit to the hypervisor; on one CPU it is a plain switch. On the 2-core machine
 * zbin is built on, a pinned line used an eighth to a third less CPU per decision (README, "A CPU of its own"). Before
 * ready the process keeps every CPU: the start's compiling and reading the record log back run in parallel. Threads
 * started later (a reconnect's MQTT threads, a compiler thread) inherit the CPUs of the thread that starts them. Java
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
        return cpus(list).contains(cpu);
    }

    /**
     * The CPUs of a kernel CPU list ({@code 0-3,6} → 0, 1, 2, 3, 6), in its order; none for null or blank.
     *
     * @throws IllegalArgumentException when the list is not one
     */
    static List<Integer> cpus(String list) {
        List<Integer> out = new java.util.ArrayList<>();
        if (list == null || list.isBlank()) return out;
        for (String part : list.trim().split(",")) {
            String[] ends = part.trim().split("-", -1);
            if (ends.length > 2 || ends[0].isEmpty()) throw new IllegalArgumentException("CPU list '" + list + "': '" + part + "' is not a CPU or a range");
            int from = Integer.parseInt(ends[0].trim()), to = ends.length == 2 ? Integer.parseInt(ends[1].trim()) : from;
            for (int c = from; c <= to; c++) out.add(c);
        }
        return out;
    }

    /**
     * Why this process cannot be pinned to {@code cpu} here, or null when it can: the CPU is not among those it may run
     * on. Unknown (no {@code /proc}, or a list this cannot read) is no objection: {@link #pin} then logs and the line runs unpinned.
     */
    public static String problem(int cpu) {
        String here = allowedHere();
        try {
            if (here == null || allows(here, cpu)) return null;
        } catch (IllegalArgumentException unreadable) {
            return null;
        }
        return "CPU " + cpu + " is not one this process may run on (allowed: " + here + ")";
    }

    /**
     * Sets every thread of this process to run on {@code cpu} only and returns how many of them now do (0 where there is
     * no {@code /proc} or no {@code taskset}: the line runs all the same, and the log says so).
     */
    static int pin(int cpu) {
        if (cpu < 0) throw new IllegalArgumentException("cpu: " + cpu + " is negative");
        String others = othersThan(cpu);
        String pid = Long.toString(ProcessHandle.current().pid());
        String notRun = OwnTool.run(List.of("taskset", "--all-tasks", "--cpu-list", "--pid", Integer.toString(cpu), pid));
        if (notRun != null) {
            LOG.warn("pin_cpu: the line runs on every CPU: {}", notRun);
            return 0;
        }
        String irq = interruptWarning(cpu);
        if (irq != null) LOG.warn("pin_cpu: {}", irq);
        int moved = others == null ? 0 : compilerTo(others, cpu);
        int[] onIt = threadsOn(cpu);
        if (onIt[0] + moved == onIt[1] && onIt[1] > 0) {
            LOG.info("all {} threads of the line on CPU {} from now on{}", onIt[0], cpu,
                    moved == 0 ? "" : ", its " + moved + " compiler threads on CPUs " + others);
        } else LOG.warn("pin_cpu: {} of {} threads of the line on CPU {} only, {} compiler threads elsewhere", onIt[0], onIt[1], cpu, moved);
        return onIt[0];
    }

    /**
     * Sets the JIT compiler's threads to the CPUs of {@code list} and returns how many now keep off {@code awayFrom}. A
     * compile holds a CPU for milliseconds; on the line's own CPU a part's threads wait behind it (at nice 19 the
     * scheduler still lets it finish a protected slice). Elsewhere it takes nothing from the line: the first parts after
     * a start, while the compiler's top tier is still at work, and any recompile later. Compiler threads the JVM adds
     * later are started by a compiler thread and keep its CPUs.
     */
    static int compilerTo(String list, int awayFrom) {
        int n = 0;
        for (String tid : CompilerThreads.compilerTids()) {
            if (OwnTool.run(List.of("taskset", "--cpu-list", "--pid", list, tid)) != null) continue;
            String now = allowedOf(SELF.resolve("task").resolve(tid).resolve("status"));
            try {
                if (now != null && !allows(now, awayFrom)) n++;
            } catch (IllegalArgumentException unreadable) { // not counted
            }
        }
        return n;
    }

    /** The CPUs this process may use other than {@code cpu} ({@link #without}); null when there are none or they are unknown. */
    public static String othersThan(int cpu) {
        try {
            return without(allowedHere(), cpu);
        } catch (IllegalArgumentException unreadable) {
            return null;
        }
    }

    /** A kernel CPU list ({@code 0-3,6}) without {@code cpu}, as single CPUs ({@code 0,1,3,6}); null when none is left or the list is unknown. */
    public static String without(String list, int cpu) {
        String out = cpus(list).stream().filter(c -> c != cpu).map(String::valueOf).collect(java.util.stream.Collectors.joining(","));
        return out.isEmpty() ? null : out;
    }

    /** The kernel's interrupt counts, {@code /proc/interrupts}; empty where there is none. */
    public static List<String> interruptTable() {
        try {
            return Files.readAllLines(Path.of("/proc/interrupts"));
        } catch (IOException | RuntimeException e) {
            return List.of();
        }
    }

    /**
     * The devices whose interrupts {@code cpu} serves, from a {@code /proc/interrupts} table: each numbered line (a
     * device's interrupt, not the CPUs' own timer and signalling rows) with at least {@code min} on {@code cpu} and at
     * least half of that line's count there, as name (the line's last word) → count on {@code cpu}. A line pinned to such
     * a CPU waits behind the device's completions: the disk's, when the record log is forced.
     */
    public static java.util.Map<String, Long> devicesServedBy(List<String> table, int cpu, long min) {
        java.util.Map<String, Long> out = new java.util.TreeMap<>();
        if (table.isEmpty()) return out;
        List<String> cpus = List.of(table.get(0).trim().split("\\s+"));
        int col = cpus.indexOf("CPU" + cpu);
        if (col < 0) return out;
        for (String l : table.subList(1, table.size())) {
            int colon = l.indexOf(':');
            if (colon < 0 || !l.substring(0, colon).trim().matches("\\d+")) continue;
            String[] f = l.substring(colon + 1).trim().split("\\s+");
            if (f.length <= cpus.size()) continue;
            long total = 0, here;
            try {
                for (int i = 0; i < cpus.size(); i++) total += Long.parseLong(f[i]);
                here = Long.parseLong(f[col]);
            } catch (NumberFormatException notCounts) {
                continue;
            }
            if (here >= min && 2 * here >= total) out.merge(f[f.length - 1], here, Long::sum);
        }
        return out;
    }

    /** The devices' interrupts {@code cpu} has served so far: the sum of {@link #devicesServedBy} with no minimum. */
    static long servedCount(List<String> table, int cpu) {
        return devicesServedBy(table, cpu, 0).values().stream().mapToLong(Long::longValue).sum();
    }

    /**
     * Of the CPUs a {@code /proc/interrupts} table lists and {@code allowed} (a kernel CPU list) holds, the one that has
     * served the fewest devices' interrupts (the last of equals); null when there is none.
     */
    public static Integer quietest(List<String> table, String allowed) {
        if (table.isEmpty() || allowed == null) return null;
        Integer best = null;
        long fewest = Long.MAX_VALUE;
        for (String col : table.get(0).trim().split("\\s+")) {
            if (!col.matches("CPU\\d+")) continue;
            int c = Integer.parseInt(col.substring(3));
            try {
                if (!allows(allowed, c)) continue;
            } catch (IllegalArgumentException unreadable) {
                return null;
            }
            long n = servedCount(table, c);
            if (n <= fewest) {
                fewest = n;
                best = c;
            }
        }
        return best;
    }

    /**
     * What to say of a line pinned to {@code cpu} when it serves more than twice the devices' interrupts (at least 1 000 so
     * far) of the quietest CPU this process may use; null otherwise. Every CPU of a small machine serves some device;
     * this names only a clearly worse choice.
     */
    public static String interruptWarning(int cpu) {
        return interruptWarning(interruptTable(), allowedHere(), cpu);
    }

    static String interruptWarning(List<String> table, String allowed, int cpu) {
        Integer quiet = quietest(table, allowed);
        if (quiet == null || quiet == cpu) return null;
        long mine = servedCount(table, cpu), theirs = servedCount(table, quiet);
        if (mine < 1000 || mine <= 2 * theirs) return null;
        return "CPU " + cpu + " has served " + mine + " interrupts of devices so far (most of them " + devicesServedBy(table, cpu, 1000).keySet()
                + "), CPU " + quiet + " " + theirs + " (/proc/interrupts): a line pinned to CPU " + cpu + " waits behind them, on CPU " + quiet + " less";
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
