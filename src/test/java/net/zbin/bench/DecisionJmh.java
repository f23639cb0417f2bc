package net.zbin.bench;

import java.nio.file.Path;
import java.util.concurrent.TimeUnit;
import java.time.Instant;
import net.zbin.core.Compensation;
import net.zbin.core.CompensationSource;
import net.zbin.core.Impedance;
import net.zbin.core.Grader;
import net.zbin.core.Reading;
import net.zbin.core.RecordedReading;
import net.zbin.core.FixtureCheck;
import net.zbin.core.PartSession;
import net.zbin.core.Recipe;
import net.zbin.core.Trigger;
import net.zbin.io.RecipeLoader;
import net.zbin.io.ReadingSource;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OperationsPerInvocation;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.infra.Blackhole;

/**
 * JMH: the decision core (a raw reading compensated and graded against the MLCC recipe), replay (a row of the
 * record-log format parsed and graded), and a decision's record row and payload encoded. Run by {@link JmhBench}.
 */
@State(Scope.Benchmark)
@BenchmarkMode(Mode.Throughput)
@OutputTimeUnit(TimeUnit.SECONDS)
public class DecisionJmh {
    static final int READINGS = 1024;
    static final int ROWS = 100_000;

    Recipe recipe;
    Recipe[] plan;
    Compensation comp, none;
    Reading[] readings;
    Path lot;
    net.zbin.core.DecisionEvent[] events;

    @Setup(Level.Trial)
    public void setUp() throws Exception {
        recipe = RecipeLoader.load(Path.of("config/recipes/mlcc-x7r-100n.yaml"));
        plan = PartSession.plan(recipe);
        // an open/short pair of a typical fixture (invented): 1.2 pF stray, 20 mΩ + 15 nH residual
        double f = recipe.freqHz();
        comp = new Compensation(f, CompensationSource.USER, Instant.EPOCH, Compensation.openFromAdmittance(f, 1.2e-12, 0),
                new Impedance(f, 0.020, 2 * Math.PI * f * 15e-9), null, null);
        none = Compensation.none(f);
        java.util.Random rnd = new java.util.Random(11);
        double w = 2 * Math.PI * recipe.freqHz();
        readings = new Reading[READINGS];
        for (int i = 0; i < READINGS; i++) {
            double c = 100e-9 * (1 + rnd.nextGaussian() * 0.08), x = -1 / (w * c);
            readings[i] = new Reading(recipe.freqHz(), Math.abs(rnd.nextGaussian() * 0.012 * x), x);
        }
        lot = ReplayBench.lot(ROWS);
        events = new net.zbin.core.DecisionEvent[READINGS];
        Instant t0 = Instant.parse("2026-03-02T08:00:00Z");
        for (int i = 0; i < READINGS; i++) {
            var g = Grader.grade(recipe, readings[i], comp, 0);
            events[i] = new net.zbin.core.DecisionEvent(t0.plusNanos(i * 5_000_000L), "line-7",
                    new net.zbin.core.Decision(1000 + i, "NC104-0042", "LOT-2026-0302-A", Trigger.Kind.PART, recipe.name(), g, 0.083, false, 0));
        }
    }

    /** One decision: compensation, equivalent circuit, D/Q/ESR/θ, plausibility and grade. */
    @Benchmark
    @OperationsPerInvocation(READINGS)
    public void decide(Blackhole bh) {
        for (Reading r : readings) bh.consume(Grader.grade(recipe, r, comp, 0));
    }

    /** The same decision as the live line makes it: a presentation's session in the engine (plan compiled once). */
    @Benchmark
    @OperationsPerInvocation(READINGS)
    public void decideThroughEngine(Blackhole bh) {
        for (Reading r : readings) bh.consume(new PartSession(plan, FixtureCheck.Limits.DEFAULT, Trigger.Kind.PART, comp, 0).offer(r, true));
    }

    /** One decision without compensation (a fixture with none loaded): the grading alone. */
    @Benchmark
    @OperationsPerInvocation(READINGS)
    public void decideUncompensated(Blackhole bh) {
        for (Reading r : readings) bh.consume(Grader.grade(recipe, r, none, 0));
    }

    /**
     * What the measuring thread does after the grade before the answer leaves: the record row and the decision payload
     * encoded, for a graded part of the lot (one row and one payload per operation).
     */
    @Benchmark
    @OperationsPerInvocation(READINGS)
    public void rowAndPayload(Blackhole bh) {
        for (net.zbin.core.DecisionEvent e : events) {
            bh.consume(net.zbin.io.RecordLog.encode(e));
            bh.consume(net.zbin.io.mqtt.Payloads.bytes(net.zbin.io.DecisionFields.json(e.decision())));
        }
    }

    /** Replay: each row read from the CSV file, parsed and graded (ops/s = rows/s). */
    @Benchmark
    @OperationsPerInvocation(ROWS)
    public void replayRows(Blackhole bh) throws Exception {
        try (ReadingSource src = ReadingSource.open(lot, bad -> { throw new IllegalStateException(bad.toString()); })) {
            RecordedReading r;
            while ((r = src.next()) != null) {
                bh.consume(Grader.grade(recipe, new Reading(r.freqHz(), r.rOhm(), r.xOhm()), comp, r.attempt()));
            }
        }
    }
}
