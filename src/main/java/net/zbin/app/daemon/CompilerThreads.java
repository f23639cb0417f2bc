package net.zbin.app.daemon;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Lowers the priority of this JVM's JIT compiler threads (Linux: their nice value), once the line is warm.
 *
 * <p>For seconds after a start the compiler is still busy. At the normal priority a compile held a core for 2–4 ms while
 * a part's threads (zbin's MQTT threads, the broker's, the handler's) waited behind it in that core's run queue, the other
 * core idle. At nice 19 the compiler gets a small share of a core that a part's threads want (the kernel's scheduler
 * still lets it finish a short protected slice before a woken thread takes the core, so a part can wait up to a few
 * milliseconds behind it), and it keeps getting that share when other programs load every core. {@code SCHED_IDLE} would
 * take it out of a part's way entirely, but on a machine whose cores are busy it gets no time at all: the line's code
 * then stays interpreted (tried: with two CPU-burning loops beside the test suite, daemons decided in up to 0.8 s). Before
 * ready the compiler keeps the normal priority: the start's warm-up and read-back of the record log need its work at
 * once. Raising a thread's own nice value needs no privilege; {@code renice} (util-linux) does it, since Java cannot.
 * Compiler threads the JVM adds later (it may on a machine with more cores, when its queue grows) keep the normal
 * priority.
 */
final class CompilerThreads {
    private static final Logger LOG = LoggerFactory.getLogger(CompilerThreads.class);
    private static final Path TASKS = Path.of("/proc/self/task");

    private CompilerThreads() {}

    /**
     * Sets the compiler threads of this process to {@code nice} (0..19) and returns how many now run at it or lower
     * (0 where there is no {@code /proc} or no {@code renice}: the line runs all the same, and the log says so).
     */
    static int lower(int nice) {
        if (nice < 0 || nice > 19) throw new IllegalArgumentException("nice: " + nice + " is not within 0..19 (raising a priority needs privilege)");
        List<String> tids = compilerTids();
        if (tids.isEmpty()) {
            LOG.info("compiler threads keep their priority: none found in {}", TASKS);
            return 0;
        }
        List<String> cmd = new ArrayList<>(List.of("renice", "-n", Integer.toString(nice), "-p"));
        cmd.addAll(tids);
        String notRun = OwnTool.run(cmd);
        if (notRun != null) {
            LOG.info("compiler threads keep their priority: {}", notRun);
            return 0;
        }
        int lowered = 0;
        for (String tid : tids) if (niceOf(tid) >= nice) lowered++;
        LOG.info("{} of {} compiler threads at nice {} from now on", lowered, tids.size(), nice);
        return lowered;
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
    static int niceOf(String tid) {
        try {
            String stat = Files.readString(TASKS.resolve(tid).resolve("stat"));
            return Integer.parseInt(stat.substring(stat.lastIndexOf(')') + 2).split(" ")[16]);
        } catch (IOException | RuntimeException e) {
            return Integer.MIN_VALUE;
        }
    }
}
