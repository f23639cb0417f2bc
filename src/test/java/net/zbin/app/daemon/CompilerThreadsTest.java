package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;

/**
 * The compiler threads of a JVM really run under {@code SCHED_IDLE} after {@link CompilerThreads#yieldToParts}, and no
 * other thread does — checked in a JVM of its own (this one's compiler keeps its policy for the rest of the suite), from
 * what the kernel says in {@code /proc}, read by the test itself.
 */
class CompilerThreadsTest {
    @Test
    void yieldToParts_putsEveryCompilerThreadUnderSchedIdle_andNoOtherThread() throws Exception {
        assumeTrue(Files.isDirectory(Path.of("/proc/self/task")), "Linux only: thread policies are read from /proc");
        Process p = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                "-cp", System.getProperty("java.class.path"), Child.class.getName()).redirectErrorStream(true).start();
        assertTrue(p.waitFor(60, TimeUnit.SECONDS), "the child JVM ended");
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertEquals(0, p.exitValue(), out);
        Map<String, Integer> before = threads(out, "before "), after = threads(out, "after ");
        assertFalse(before.keySet().stream().noneMatch(t -> t.contains("CompilerThre")), "the child listed its compiler threads:\n" + out);
        before.forEach((t, policy) -> assertEquals(0, policy, t + " starts under SCHED_OTHER (0):\n" + out));
        after.forEach((t, policy) -> {
            // SCHED_IDLE is 5 and SCHED_OTHER 0 in the kernel's ABI (include/uapi/linux/sched.h)
            if (before.containsKey(t)) assertEquals(t.contains("CompilerThre") ? 5 : 0, policy, t + " after yieldToParts():\n" + out);
        });
        int moved = Integer.parseInt(out.lines().filter(l -> l.startsWith("moved ")).findFirst().orElseThrow().substring(6));
        assertEquals(before.keySet().stream().filter(t -> t.contains("CompilerThre")).count(), moved, "yieldToParts() counts what the kernel shows:\n" + out);
    }

    /** {@code <prefix><tid> <name>} → policy, from the child's lines. */
    private static Map<String, Integer> threads(String out, String prefix) {
        Map<String, Integer> m = new TreeMap<>();
        for (String line : out.lines().toList()) {
            int eq = line.lastIndexOf('=');
            if (line.startsWith(prefix) && eq > 0) m.put(line.substring(prefix.length(), eq), Integer.parseInt(line.substring(eq + 1)));
        }
        return m;
    }

    /** Lists its threads' scheduling policies, moves its compiler threads, lists them again. */
    static final class Child {
        public static void main(String[] args) throws Exception {
            print("before ");
            System.out.println("moved " + CompilerThreads.yieldToParts());
            print("after ");
        }

        static void print(String prefix) throws Exception {
            try (var tasks = Files.list(Path.of("/proc/self/task"))) {
                for (Path t : tasks.toList()) {
                    String tid = t.getFileName().toString();
                    String stat = Files.readString(t.resolve("stat")); // the policy is the 41st field (proc(5)); the 3rd follows the name's ")"
                    String policy = stat.substring(stat.lastIndexOf(')') + 2).split(" ")[38];
                    System.out.println(prefix + tid + " " + Files.readString(t.resolve("comm")).strip() + "=" + policy);
                }
            }
        }

        private Child() {}
    }
}
