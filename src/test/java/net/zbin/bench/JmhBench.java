package net.zbin.bench;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.BufferedWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Collection;
import java.util.Random;
import org.junit.jupiter.api.Test;
import org.openjdk.jmh.results.RunResult;
import org.openjdk.jmh.results.format.ResultFormatType;
import org.openjdk.jmh.runner.Runner;
import org.openjdk.jmh.runner.options.Options;
import org.openjdk.jmh.runner.options.OptionsBuilder;

/**
 * Runs the JMH benchmarks of {@link DecisionJmh} (one fork, 3 warm-up and 5 measured iterations of 1 s) with
 * {@code mvn -B -Pbench test}; JMH's own JSON in target/bench/jmh.json.
 */
class JmhBench {
    /** A record-log-shaped CSV of {@code n} invented MLCC readings, written once under target/bench. */
    static Path rows(int n) throws Exception {
        Path f = Files.createDirectories(Path.of("target/bench")).resolve("jmh-lot-" + n + ".csv");
        if (Files.exists(f)) return f;
        Random rnd = new Random(64);
        double w = 2 * Math.PI * 1000;
        try (BufferedWriter out = Files.newBufferedWriter(f)) {
            out.write("time,lot,seq,freq_hz,r_ohm,x_ohm\n");
            for (int i = 0; i < n; i++) {
                double c = 100e-9 * (1 + rnd.nextGaussian() * 0.08), x = -1 / (w * c), r = Math.abs(rnd.nextGaussian() * 0.012) * Math.abs(x);
                out.write("2026-11-30T07:00:00Z,HG-2611-09," + i + ",1000," + r + "," + x + "\n");
            }
        }
        return f;
    }

    @Test
    void decisionCoreAndReplayRows() throws Exception {
        Options o = new OptionsBuilder().include(DecisionJmh.class.getName())
                .forks(1).warmupIterations(3).measurementIterations(5)
                .warmupTime(org.openjdk.jmh.runner.options.TimeValue.seconds(1))
                .measurementTime(org.openjdk.jmh.runner.options.TimeValue.seconds(1))
                .jvmArgs("-Xmx1g")
                .resultFormat(ResultFormatType.JSON).result("target/bench/jmh.json").build();
        Collection<RunResult> results = new Runner(o).run();
        for (RunResult r : results) {
            double perS = r.getPrimaryResult().getScore();
            System.out.printf("%-52s %,14.0f ops/s (± %,.0f)%n", r.getParams().getBenchmark(), perS, r.getPrimaryResult().getScoreError());
            assertTrue(perS > 0);
        }
    }
}
