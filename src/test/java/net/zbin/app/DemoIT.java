package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The README's demo command, as a process from the jar. */
class DemoIT {
    @TempDir
    Path dir;

    @Test
    void demoWith2000Parts_exitsZeroAndPrintsTheSummary() throws Exception {
        Process p = new ProcessBuilder("java", "-jar", Jar.path(), "demo", "--parts", "2000", "--out", dir.toString())
                .redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(5, TimeUnit.MINUTES));
        assertEquals(0, p.exitValue(), out);
        assertTrue(out.contains("2000 parts"), out);
        assertTrue(out.contains("latency p50"), out);
        assertTrue(out.contains("missing 0, duplicate 0, contradictory 0"), out);
        assertTrue(out.contains("demo ok"), out);
        Cli replay = Cli.run("replay", "--recipe", dir.resolve("recipes/mlcc-x7r-100n.yaml").toString(), "--in",
                dir.resolve("records").toFile().listFiles()[0].toString(), "--json");
        assertEquals(0, replay.exit(), replay.err());
    }
}
