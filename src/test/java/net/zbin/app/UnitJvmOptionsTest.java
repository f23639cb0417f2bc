package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;

/**
 * The systemd unit's {@code java} options do what its comment says on this JVM and kernel: a JVM started with them
 * runs its JIT compiler threads at nice 19 and the threads zbin starts at nice 0. (A flag the JVM ignores, or one that needs
 * a second flag to take effect, would pass a check of the unit's text.)
 */
class UnitJvmOptionsTest {
    @Test
    void theUnitsJvmOptions_runTheCompilerThreadsAtNice19_andZbinsOwnAtNice0() throws Exception {
        assumeTrue(Files.isDirectory(Path.of("/proc/self/task")), "Linux only: thread nice values come from /proc");
        List<String> cmd = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString()));
        cmd.addAll(MosquittoAndSystemdFiles.unitJvmOptions(Path.of("config/systemd/zbin@.service")));
        cmd.addAll(List.of("-cp", System.getProperty("java.class.path"), Threads.class.getName()));
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        assertTrue(p.waitFor(60, TimeUnit.SECONDS), "the JVM with the unit's options ended");
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertEquals(0, p.exitValue(), out);
        Map<String, Integer> compilers = new TreeMap<>(), others = new TreeMap<>();
        for (String line : out.lines().toList()) {
            int eq = line.lastIndexOf('=');
            if (!line.startsWith("thread ") || eq < 0) continue;
            String name = line.substring(7, eq);
            (name.contains("CompilerThre") ? compilers : others).put(name, Integer.parseInt(line.substring(eq + 1)));
        }
        assertFalse(compilers.isEmpty(), "the JVM listed its compiler threads:\n" + out);
        compilers.forEach((name, nice) -> assertEquals(19, nice, name + " runs at nice 19:\n" + out));
        assertEquals(0, others.getOrDefault("main", -1), "the main thread runs at nice 0:\n" + out);
    }

    /**
     * Prints {@code thread <name>=<nice>} for each of its own threads (fields of {@code /proc/self/task/<tid>/stat}),
     * then its own as {@code main} (a Java thread at the normal priority, as zbin's are).
     */
    static final class Threads {
        public static void main(String[] args) throws Exception {
            try (var tasks = Files.list(Path.of("/proc/self/task"))) {
                for (Path t : tasks.toList()) {
                    String name = Files.readString(t.resolve("comm")).strip();
                    String stat = Files.readString(t.resolve("stat"));
                    // after the ")" that closes the name: state is the 3rd field of the line, nice the 19th
                    String[] f = stat.substring(stat.lastIndexOf(')') + 2).split(" ");
                    System.out.println("thread " + name + "=" + f[16]);
                }
            }
            String self = Files.readString(Path.of("/proc/thread-self/stat"));
            System.out.println("thread main=" + self.substring(self.lastIndexOf(')') + 2).split(" ")[16]);
        }
    }
}
