package net.zbin.app;

import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import java.util.function.LongFunction;
import java.util.function.UnaryOperator;
import net.zbin.core.AlarmCode;
import net.zbin.core.Compensation;
import net.zbin.core.CompensationSource;
import net.zbin.core.Decision;
import net.zbin.core.FixtureCheck;
import net.zbin.core.Grader;
import net.zbin.core.Impedance;
import net.zbin.core.LineMonitor;
import net.zbin.core.Reading;
import net.zbin.core.Recipe;
import net.zbin.core.Trigger;
import net.zbin.sim.Contacts;
import net.zbin.sim.Fixture;
import net.zbin.sim.LotGenerator;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.apache.commons.math3.complex.Complex;

/**
 * A simulated line without the meter's text protocol, fast enough for millions of parts: the scenario's lot
 * generator and fixture model, the meter simulator's noise at medium speed (2e-4 of |Z|, as SimMeter.noiseRel),
 * the real grader and line monitor. The fixture may change part by part, and the parts may be shifted; open and
 * short checks run every {@code checkEvery} parts through the same fixture.
 */
final class LeanLine {
    record Raised(long part, AlarmCode.Change change) {}

    final Recipe recipe;
    final LineMonitor monitor;
    final List<Raised> alarms = new ArrayList<>();
    private final Scenario sc;
    private final LotGenerator gen;
    private final Random rnd;
    private final Compensation comp;
    private final double f;
    long part;

    LeanLine(Scenario sc, Recipe recipe, long seed) {
        this.sc = sc;
        this.recipe = recipe;
        this.f = recipe.freqHz();
        Fixture fixture = sc.fixture().toFixture();
        Complex open = fixture.readOpen(f, 0), shortZ = fixture.readShort(f, 0);
        comp = new Compensation(f, CompensationSource.USER, Instant.parse("2026-12-01T06:00:00Z"),
                new Impedance(f, open.getReal(), open.getImaginary()), new Impedance(f, shortZ.getReal(), shortZ.getImaginary()), null, null);
        monitor = new LineMonitor(recipe.monitor(), FixtureCheck.Limits.DEFAULT, recipe);
        gen = new LotGenerator(sc, seed);
        rnd = new Random(seed * 31 + 7);
    }

    private Reading read(Complex z) {
        double s = 2e-4 * z.abs();
        return new Reading(f, z.getReal() + rnd.nextGaussian() * s, z.getImaginary() + rnd.nextGaussian() * s);
    }

    private void observe(Trigger.Kind kind, net.zbin.core.Grading g) {
        for (AlarmCode.Change c : monitor.observe(new Decision(part, "P", "LOT", kind, recipe.name(), g, 1, false, 0)))
            alarms.add(new Raised(part, c));
    }

    /** n parts; the fixture of each part from {@code fixtureAt} (part index), the parts through {@code shift}. */
    LeanLine run(long n, LongFunction<Fixture> fixtureAt, UnaryOperator<PartModel> shift, int checkEvery) {
        for (long end = part + n; part < end; part++) {
            Fixture fx = fixtureAt.apply(part);
            LotGenerator.SimPart p = gen.next();
            if (p.state() == Contacts.State.PART) observe(Trigger.Kind.PART, Grader.grade(recipe, read(fx.read(shift.apply(p.model()).impedance(f), f, 0)), comp, 1));
            if (checkEvery > 0 && part % checkEvery == checkEvery - 1) {
                observe(Trigger.Kind.OPEN, FixtureCheck.open(recipe, read(fx.readOpen(f, 0)), comp, FixtureCheck.Limits.DEFAULT));
                observe(Trigger.Kind.SHORT, FixtureCheck.shortBar(recipe, read(fx.readShort(f, 0)), comp, FixtureCheck.Limits.DEFAULT));
            }
        }
        return this;
    }

    LeanLine run(long n) { return run(n, i -> sc.fixture().toFixture(), m -> m, 0); }

    long raised(AlarmCode... codes) {
        return alarms.stream().filter(a -> a.change().active() && java.util.Arrays.asList(codes).contains(a.change().code())).count();
    }

    /** The part index at which the first of these alarms rose at or after {@code from} (−1: none). */
    long firstRaised(long from, AlarmCode... codes) {
        return alarms.stream().filter(a -> a.part() >= from && a.change().active() && java.util.Arrays.asList(codes).contains(a.change().code()))
                .mapToLong(Raised::part).findFirst().orElse(-1);
    }
}
