package net.zbin.bench;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Collection;
import org.junit.jupiter.api.Test;
import org.openjdk.jmh.results.RunResult;
import org.openjdk.jmh.results.format.ResultFormatType;
import org.openjdk.jmh.runner.Runner;
import org.openjdk.jmh.runner.options.Options;
import org.openjdk.jmh.runner.options.OptionsBuilder;

/**
 * Runs the JMH benchmarks of {@link DecisionJmh} (two forks, each 5 warm-up and 5 measured iterations of 1 s) with
 * {@code mvn -B -Pbench test}; JMH's own JSON in target/bench/jmh.json. Three warm-up seconds left the JIT still at work
 * in the first measured ones (a first iteration a third below the rest), and one fork's compilation can settle on a
 * slower shape than another's: two forks put that spread into the error bar instead of the mean.
 */
class JmhBench {
    @Test
    void decisionCoreAndReplayRows() throws Exception {
        java.nio.file.Files.createDirectories(java.nio.file.Path.of("target/bench")); // also when run alone (-Dtest=JmhBench)
        Options o = new OptionsBuilder().include(DecisionJmh.class.getName())
                .forks(2).warmupIterations(5).measurementIterations(5)
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
