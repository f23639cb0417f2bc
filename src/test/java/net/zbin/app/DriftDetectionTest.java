package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.Locale;
import java.util.function.LongFunction;
import java.util.function.UnaryOperator;
import net.zbin.core.AlarmCode;
import net.zbin.core.Recipe;
import net.zbin.io.RecipeLoader;
import net.zbin.sim.Fixture;
import net.zbin.sim.PartModel;
import net.zbin.sim.Scenario;
import org.junit.jupiter.api.Test;

/**
 * How fast the budgeted drift charts catch what they are for, on simulated lines (several seeds each): a step
 * of the fixture's stray C on a 47 pF part, a shift of a third of the parts' σ, a stray-C ramp, contacts that
 * wear. The delays are counted in parts from the change (the README quotes the printed figures).
 */
class DriftDetectionTest {
    static final int SEEDS = 5;
    static final long LEARN = 12_000; // past the recipes' 10 000-part baseline

    static Scenario scenario(String name) throws Exception { return Scenario.read(Path.of("simulators/scenarios", name + ".yaml")); }

    static Recipe recipe(String name) throws Exception { return RecipeLoader.load(Path.of("config/recipes", name + ".yaml")); }

    /** Parts from the change to the first of the alarms, per seed. */
    static long[] delays(Scenario sc, Recipe r, LongFunction<Fixture> changed, UnaryOperator<PartModel> shift, long after, AlarmCode... codes) {
        long[] out = new long[SEEDS];
        Fixture base = sc.fixture().toFixture();
        for (int s = 0; s < SEEDS; s++) {
            LeanLine line = new LeanLine(sc, r, 7919L * (s + 1));
            line.run(LEARN, i -> base, m -> m, 250);
            line.run(after, i -> changed.apply(i - LEARN), shift, 250);
            long at = line.firstRaised(LEARN, codes);
            out[s] = at < 0 ? Long.MAX_VALUE : at - LEARN;
        }
        return out;
    }

    static double mean(long[] a) { return java.util.Arrays.stream(a).average().orElse(Double.NaN); }

    @Test
    void aQuarterPicofaradStepOfStray_on47pF_isCaughtWithinAFewHundredParts_andBlamedOnTheCompensation() throws Exception {
        Scenario sc = scenario("harrowgate-c0g-47p-stable");
        Recipe r = recipe("mlcc-c0g-47p");
        Fixture base = sc.fixture().toFixture();
        long[] d = delays(sc, r, i -> base.withStray(base.strayF() + 0.25e-12), m -> m, 5_000, AlarmCode.VALUE_DRIFT);
        long[] c = delays(sc, r, i -> base.withStray(base.strayF() + 0.25e-12), m -> m, 5_000, AlarmCode.COMPENSATION_OFFSET);
        System.out.printf(Locale.ROOT, "0.25 pF stray step on 47 pF: value drift after %s parts (mean %.0f), compensation-offset after %s%n",
                java.util.Arrays.toString(d), mean(d), java.util.Arrays.toString(c));
        for (long x : d) assertTrue(x <= 2_500, "caught within 2 500 parts: " + java.util.Arrays.toString(d));
        for (long x : c) assertTrue(x <= 2_500, "blamed on the compensation within 2 500 parts: " + java.util.Arrays.toString(c));
    }

    @Test
    void aShiftOfAThirdOfThePartsSigma_isCaughtWithin2500Parts() throws Exception {
        Scenario sc = scenario("harrowgate-c0g-100p-stable");
        Recipe r = recipe("mlcc-c0g-100p");
        double step = sc.part().spreadPct() / 3 / 100; // a third of the parts' σ
        Fixture base = sc.fixture().toFixture();
        long[] d = delays(sc, r, i -> base, m -> m instanceof PartModel.Capacitor cap
                ? new PartModel.Capacitor(cap.capF() * (1 + step), cap.esrOhm(), cap.eslH(), cap.tanDelta()) : m, 5_000, AlarmCode.VALUE_DRIFT);
        System.out.printf(Locale.ROOT, "shift of a third of the parts' σ (%.2f %%) on 100 pF: value drift after %s parts (mean %.0f)%n",
                step * 100, java.util.Arrays.toString(d), mean(d));
        assertTrue(mean(d) <= 2_500, java.util.Arrays.toString(d));
        for (long x : d) assertTrue(x < Long.MAX_VALUE, "every seed caught it: " + java.util.Arrays.toString(d));
    }

    @Test
    void aStrayRamp_isCaughtAndBlamedOnTheCompensation() throws Exception {
        Scenario sc = scenario("harrowgate-c0g-100p-stable");
        Recipe r = recipe("mlcc-c0g-100p");
        Fixture base = sc.fixture().toFixture();
        double perPart = 0.5e-12 / 20_000; // 0.5 pF over 20 000 parts (an hour at 5.6 parts/s)
        LongFunction<Fixture> ramp = i -> base.withStray(base.strayF() + perPart * i);
        long[] d = delays(sc, r, ramp, m -> m, 20_000, AlarmCode.VALUE_DRIFT);
        long[] c = delays(sc, r, ramp, m -> m, 20_000, AlarmCode.COMPENSATION_OFFSET);
        System.out.printf(Locale.ROOT, "stray ramp 0.5 pF per 20 000 parts on 100 pF: value drift after %s parts (mean %.0f, %.3f pF moved),"
                + " compensation-offset after %s%n", java.util.Arrays.toString(d), mean(d), mean(d) * perPart * 1e12, java.util.Arrays.toString(c));
        for (long x : c) assertTrue(x <= 12_000, "blamed on the compensation before 0.3 pF: " + java.util.Arrays.toString(c));
    }

    @Test
    void contactsThatWear_raiseALossDrift_upwards() throws Exception {
        Scenario sc = scenario("harrowgate-mlcc-100n");
        Recipe r = recipe("mlcc-x7r-100n");
        Fixture base = sc.fixture().toFixture();
        double perPart = 120.0 / 360_000; // 120 Ω an hour at 100 parts/s
        long[] d = delays(sc, r, i -> new Fixture(base.strayF(), base.strayGS(), base.residualROhm() + perPart * i, base.residualLH(), 0, 0),
                m -> m, 20_000, AlarmCode.LOSS_DRIFT);
        System.out.printf(Locale.ROOT, "contact wear 120 Ω/h at 100 parts/s on 100 nF X7R at 1 kHz: D drift after %s parts (mean %.0f, %.2f Ω gained)%n",
                java.util.Arrays.toString(d), mean(d), mean(d) * perPart);
        for (long x : d) assertTrue(x <= 20_000, java.util.Arrays.toString(d));
        LeanLine line = new LeanLine(sc, r, 1);
        line.run(LEARN, i -> base, m -> m, 0);
        line.run(20_000, i -> new Fixture(base.strayF(), base.strayGS(), base.residualROhm() + perPart * (i - LEARN), base.residualLH(), 0, 0), m -> m, 0);
        assertEquals(1, line.alarms.stream().filter(a -> a.change().code() == AlarmCode.LOSS_DRIFT && a.change().active()).findFirst()
                .map(a -> a.change().message().contains(" up ") ? 1 : -1).orElse(0), "D drifted up");
    }

    @Test
    void anAlarm_staysUpWhileTheDriftLasts_andClearsWhenItIsGone() throws Exception {
        Scenario sc = scenario("harrowgate-c0g-47p-stable");
        Recipe r = recipe("mlcc-c0g-47p");
        Fixture base = sc.fixture().toFixture(), stepped = base.withStray(base.strayF() + 0.25e-12);
        LeanLine line = new LeanLine(sc, r, 11);
        line.run(LEARN, i -> base, m -> m, 250);
        line.run(3_000, i -> stepped, m -> m, 250);
        line.run(3_000, i -> base, m -> m, 250);
        var drift = line.alarms.stream().filter(a -> a.change().code() == AlarmCode.VALUE_DRIFT).toList();
        assertEquals(2, drift.size(), "raised once and cleared once: " + drift);
        assertTrue(drift.get(0).change().active() && drift.get(0).part() < LEARN + 500, drift.toString());
        assertTrue(!drift.get(1).change().active() && drift.get(1).part() > LEARN + 3_000 && drift.get(1).part() < LEARN + 4_500, drift.toString());
        // A slow ramp keeps restarting the charts; the alarm must not flap.
        Scenario sc100 = scenario("harrowgate-c0g-100p-stable");
        Fixture b100 = sc100.fixture().toFixture();
        LeanLine ramp = new LeanLine(sc100, recipe("mlcc-c0g-100p"), 1);
        double perPart = 0.5e-12 / 20_000;
        ramp.run(30_000, i -> b100.withStray(b100.strayF() + perPart * i), m -> m, 250);
        assertEquals(1, ramp.raised(AlarmCode.VALUE_DRIFT), "one alarm for one ramp: " + ramp.alarms);
    }

    @Test
    void aOnePercentStep_onAnX7RLot_isCaughtWithin2500Parts() throws Exception {
        Scenario sc = scenario("harrowgate-mlcc-100n"); // σ of the parts 4 %: a 1 % step is a quarter of it
        Recipe r = recipe("mlcc-x7r-100n");
        Fixture base = sc.fixture().toFixture();
        long[] d = delays(sc, r, i -> base, m -> m instanceof PartModel.Capacitor cap
                ? new PartModel.Capacitor(cap.capF() * 1.01, cap.esrOhm(), cap.eslH(), cap.tanDelta()) : m, 5_000, AlarmCode.VALUE_DRIFT);
        System.out.printf(Locale.ROOT, "+1 %% step on 100 nF X7R (σ 4 %%): value drift after %s parts (mean %.0f)%n", java.util.Arrays.toString(d), mean(d));
        assertTrue(mean(d) <= 2_500, java.util.Arrays.toString(d));
    }
}
