package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.BufferedWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The real jar replays a million rows in a 64 MB heap and its counts match an independent grading. */
class ReplayLargeIT {
    @TempDir
    Path dir;

    @Test
    void millionRows_underXmx64m_matchIndependentGrading() throws Exception {
        Path lot = dir.resolve("million.csv");
        Map<Integer, Long> expected = new TreeMap<>();
        Random rnd = new Random(64);
        double w = IndependentMlccGrader.W;
        try (BufferedWriter out = Files.newBufferedWriter(lot)) {
            out.write("time,lot,seq,freq_hz,r_ohm,x_ohm,note\n");
            for (int i = 0; i < 1_000_000; i++) {
                double c = 100e-9 * (1 + rnd.nextGaussian() * 0.08);
                if (i % 97 == 0) c = 2e-12;
                double x = -1 / (w * c), r = Math.abs(rnd.nextGaussian() * 0.012) * Math.abs(x);
                expected.merge(IndependentMlccGrader.bin(r, x), 1L, Long::sum);
                out.write("2026-11-30T07:00:00Z,HG-2611-09," + i + ",1000," + r + "," + x + ",\"a, quoted note\"\n");
            }
        }
        Process p = new ProcessBuilder("java", "-Xmx64m", "-jar", Jar.path(), "replay", "--recipe",
                Path.of(ReplayCommandTest.RECIPE).toAbsolutePath().toString(), "--in", lot.toString(), "--json")
                .redirectError(ProcessBuilder.Redirect.INHERIT).start();
        byte[] out = p.getInputStream().readAllBytes();
        p.waitFor(5, TimeUnit.MINUTES);
        assertEquals(0, p.exitValue());
        JsonNode s = new ObjectMapper().readTree(out);
        long retests = expected.getOrDefault(0, 0L); // open contacts at their first presentation: retests, not finished parts
        expected.remove(0);
        assertEquals(1_000_000 - retests, s.get("total").asLong());
        assertEquals(1_000_000, s.get("presentations").asLong());
        assertEquals(expected, ReplayCommandTest.countsOf(s));
    }
}
