package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
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
 * The compiler threads of a JVM really run at nice 19 after {@link CompilerThreads#lower}, and no other thread does —
 * checked in a JVM of its own (this one's compiler keeps its priority for the rest of the suite), from what the kernel
 * says in {@code /proc}, read by the test itself.
 */
class CompilerThreadsTest {
    @Test
    void lower_setsEveryCompilerThreadToNice19_andNoOtherThread() throws Exception {
        assumeTrue(Files.isDirectory(Path.of("/proc/self/task")), "Linux only: thread priorities are read from /proc");
        Process p = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                "-cp", System.getProperty("java.class.path"), Child.class.getName()).redirectErrorStream(true).start();
        assertTrue(p.waitFor(60, TimeUnit.SECONDS), "the child JVM ended");
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertEquals(0, p.exitValue(), out);
        Map<String, Integer> before = threads(out, "before "), after = threads(out, "after ");
        assertFalse(before.keySet().stream().noneMatch(t -> t.contains("CompilerThre")), "the child listed its compiler threads:\n" + out);
        int start = before.values().iterator().next(); // the nice value this test runs at (0 unless the build itself was niced)
        before.forEach((t, nice) -> assertEquals(start, nice, t + " starts at the child's own nice value:\n" + out));
        after.forEach((t, nice) -> {
            if (before.containsKey(t)) assertEquals(t.contains("CompilerThre") ? 19 : start, nice, t + " after lower(19):\n" + out);
        });
        int lowered = Integer.parseInt(out.lines().filter(l -> l.startsWith("lowered ")).findFirst().orElseThrow().substring(8));
        assertEquals(before.keySet().stream().filter(t -> t.contains("CompilerThre")).count(), lowered, "lower() counts what the kernel shows:\n" + out);
    }

    @Test
    void aPriorityAbove0OrPast19_isRefused() {
        assertThrows(IllegalArgumentException.class, () -> CompilerThreads.lower(-1));
        assertThrows(IllegalArgumentException.class, () -> CompilerThreads.lower(20));
    }

    /** {@code <prefix><tid> <name>} → nice, from the child's lines. */
    private static Map<String, Integer> threads(String out, String prefix) {
        Map<String, Integer> m = new TreeMap<>();
        for (String line : out.lines().toList()) {
            int eq = line.lastIndexOf('=');
            if (line.startsWith(prefix) && eq > 0) m.put(line.substring(prefix.length(), eq), Integer.parseInt(line.substring(eq + 1)));
        }
        return m;
    }

    /** Lists its threads' nice values, lowers its compiler threads, lists them again. */
    static final class Child {
        public static void main(String[] args) throws Exception {
            print("before ");
            System.out.println("lowered " + CompilerThreads.lower(19));
            print("after ");
        }

        static void print(String prefix) throws Exception {
            try (var tasks = Files.list(Path.of("/proc/self/task"))) {
                for (Path t : tasks.toList()) {
                    String tid = t.getFileName().toString();
                    String stat = Files.readString(t.resolve("stat")); // the nice value is the 19th field; the 3rd follows the name's ")"
                    String nice = stat.substring(stat.lastIndexOf(')') + 2).split(" ")[16];
                    System.out.println(prefix + tid + " " + Files.readString(t.resolve("comm")).strip() + "=" + nice);
                }
            }
        }

        private Child() {}
    }
}
