package net.zbin.app.daemon;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Puts this JVM's JIT compiler threads under Linux's {@code SCHED_IDLE} policy once the line is warm, so that they run
 * only on a core nothing else wants.
 *
 * <p>For seconds after a start the compiler is still busy. At the normal priority a compile held a core for 2–4 ms while
 * a part's threads (zbin's MQTT threads, the broker's, the handler's, the meter's) waited behind it in that core's run
 * queue, the other core idle. Nice 19 did not stop it: the kernel's scheduler (EEVDF, Linux 6.6 on) lets the running
 * task finish a protected slice before a woken one takes its core, whatever its nice value: a scheduler trace of a fresh
 * daemon's first decisions at nice 19 still showed a part's threads waiting milliseconds behind its compiler threads. A
 * {@code SCHED_IDLE} task is preempted by any normal task at once, and a core that runs only such tasks counts as idle
 * when the kernel places a woken thread (sched(7)); such waits all but went. Before ready the compiler keeps the normal
 * policy: the start's warm-up and read-back of the record log need its work at once. Moving one's own threads to
 * {@code SCHED_IDLE} needs no privilege; {@code chrt} (util-linux) does it, since Java cannot. Where that fails, the
 * threads go to nice 19 with {@code renice}. Compiler threads the JVM adds later (it may on a machine with more cores,
 * when its queue grows) keep the normal policy.
 */
final class CompilerThreads {
    private static final Logger LOG = LoggerFactory.getLogger(CompilerThreads.class);
    private static final Path TASKS = Path.of("/proc/self/task");
    /** {@code SCHED_IDLE}'s number in the kernel's ABI (linux/sched.h), as {@code /proc/<pid>/task/<tid>/stat} shows it. */
    static final int SCHED_IDLE = 5;

    private CompilerThreads() {}

    /**
     * Moves this process's compiler threads to {@code SCHED_IDLE} (those {@code chrt} could not move: to nice 19) and
     * returns how many now run under {@code SCHED_IDLE}, as the kernel reports it (0 where there is no {@code /proc} or
     * neither tool: the line runs all the same, and the log says so).
     */
    static int yieldToParts() {
        List<String> tids = compilerTids();
        if (tids.isEmpty()) {
            LOG.info("compiler threads keep their priority: none found in {}", TASKS);
            return 0;
        }
        List<String> left = new ArrayList<>();
        for (String tid : tids) {
            run(List.of("chrt", "--idle", "-p", "0", tid));
            if (policyOf(tid) != SCHED_IDLE) left.add(tid);
        }
        if (!left.isEmpty()) {
            List<String> cmd = new ArrayList<>(List.of("renice", "-n", "19", "-p"));
            cmd.addAll(left);
            run(cmd);
        }
        int idle = tids.size() - left.size();
        long niced = left.stream().filter(t -> niceOf(t) >= 19).count();
        LOG.info("{} of {} compiler threads under SCHED_IDLE from now on{}", idle, tids.size(), left.isEmpty() ? "" : " (" + niced + " at nice 19)");
        return idle;
    }

    private static void run(List<String> cmd) {
        try {
            Process p = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(ProcessBuilder.Redirect.DISCARD).start();
            if (!p.waitFor(5, TimeUnit.SECONDS)) p.destroyForcibly();
        } catch (IOException e) {
            LOG.debug("{}: {}", cmd.get(0), e.getMessage());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    /** The thread ids of HotSpot's compiler threads ({@code C1 CompilerThread0}, … as the kernel shortens their names). */
    static List<String> compilerTids() {
        List<String> out = new ArrayList<>();
        if (!Files.isDirectory(TASKS)) return out;
        try (var tasks = Files.list(TASKS)) {
            for (Path t : tasks.toList()) {
                try {
                    if (Files.readString(t.resolve("comm")).contains("CompilerThre")) out.add(t.getFileName().toString());
                } catch (IOException gone) { // the thread ended meanwhile
                }
            }
        } catch (IOException e) {
            LOG.debug("{} not listed: {}", TASKS, e.toString());
        }
        return out;
    }

    /** The nice value of this process's thread {@code tid} (field 19 of its {@code stat}); Integer.MIN_VALUE when unknown. */
    static int niceOf(String tid) { return statField(tid, 19); }

    /** The scheduling policy of this process's thread {@code tid} (field 41 of its {@code stat}); Integer.MIN_VALUE when unknown. */
    static int policyOf(String tid) { return statField(tid, 41); }

    /** Field {@code n} (1-based, proc(5)) of the thread's {@code stat}; the name in field 2 may hold spaces, so count after its ")". */
    private static int statField(String tid, int n) {
        try {
            String stat = Files.readString(TASKS.resolve(tid).resolve("stat"));
            return Integer.parseInt(stat.substring(stat.lastIndexOf(')') + 2).split(" ")[n - 3]);
        } catch (IOException | RuntimeException e) {
            return Integer.MIN_VALUE;
        }
    }
}
