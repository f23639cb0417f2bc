package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.Combinators;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.jqwik.api.constraints.DoubleRange;
import net.jqwik.api.constraints.IntRange;
import net.zbin.core.Compensation;
import net.zbin.core.CompensationSource;
import net.zbin.core.ContactCheck;
import net.zbin.core.FixtureBounds;
import net.zbin.core.Gates;
import net.zbin.core.Grade;
import net.zbin.core.Grader;
import net.zbin.core.Grading;
import net.zbin.core.GradingMode;
import net.zbin.core.GuardBand;
import net.zbin.core.Impedance;
import net.zbin.core.ModelPolicy;
import net.zbin.core.PartType;
import net.zbin.core.PrimaryParam;
import net.zbin.core.Reading;
import net.zbin.core.Recipe;
import net.zbin.core.RejectBins;
import net.zbin.core.RetestPolicy;
import net.zbin.core.TestConditions;
import net.zbin.core.Verdict;

/**
 * Invariants of grading, over the shipped recipes and generated ones (jqwik, seeded, 10 000 cases each):
 * grading is monotonic in the primary value, a guard band never widens acceptance, a reading that the
 * fixture itself could give never passes, and every reading lands in exactly one bin of the plan.
 */
class GradingPropertiesTest {
    static final List<Recipe> SHIPPED = shipped();

    static List<Recipe> shipped() {
        List<Recipe> out = new ArrayList<>();
        for (String n : new String[] {"mlcc-x7r-100n", "inductor-pwr-4u7", "resistor-prec-4k99"}) {
            try {
                out.add(RecipeLoader.load(Path.of("config/recipes", n + ".yaml")));
            } catch (ConfigException e) {
                throw new AssertionError(e);
            }
        }
        // Not shipped: an auto-model recipe whose nominal (1.5 µF at 1 kHz, 106 Ω) sits at the series/parallel
        // boundary, graded with loss up to D 0.3, where a per-reading model choice would break monotonicity.
        out.add(new Recipe("boundary", PartType.CAPACITOR, 1.5e-6, new TestConditions(1000, 1, "medium", 1), ModelPolicy.DEFAULT,
                null, GradingMode.CONCENTRIC, List.of(new Grade("J", 1, -5, 5), new Grade("K", 2, -10, 10), new Grade("M", 3, -20, 20)),
                new GuardBand(0.2, true), Gates.NONE, null, new RejectBins(7, 8, 9, 10, 10, 11, 11), new RetestPolicy(1, 0),
                ContactCheck.DEFAULT, false));
        return out;
    }

    /** A reading whose primary value under the recipe's resolved model is {@code value}, with loss d (tan δ). */
    static Impedance withValue(Recipe r, double value, double d) {
        double w = 2 * Math.PI * r.freqHz();
        PrimaryParam p = r.primaryParam();
        return switch (p) {
            case CS -> { double x = -1 / (w * value); yield new Impedance(r.freqHz(), d * Math.abs(x), x); }
            case LS -> { double x = w * value; yield new Impedance(r.freqHz(), d * x, x); }
            case RS -> new Impedance(r.freqHz(), value, d * value);
            case CP -> fromY(r.freqHz(), d * w * value, w * value);
            case LP -> fromY(r.freqHz(), d / (w * value), -1 / (w * value));
            case RP -> fromY(r.freqHz(), 1 / value, d / value);
            case Z -> new Impedance(r.freqHz(), value, 0);
        };
    }

    static Impedance fromY(double f, double g, double b) {
        double y2 = g * g + b * b;
        return new Impedance(f, g / y2, -b / y2);
    }

    static Grading grade(Recipe r, Impedance z) {
        // Fully compensated fixture: the recipes that need compensation get it.
        return Grader.gradeCorrected(r, z, Reading.of(z), CompensationSource.USER, 0, true, true);
    }

    /** Loss that passes every shipped recipe's gates and plausibility: D tiny, phase near ±90° (or 0° for R). */
    static double lossFor(Recipe r, double u) {
        return r.name().equals("boundary") ? u * 0.3 : u * 1e-3;
    }

    static int index(Recipe r, Grading g) {
        for (int i = 0; i < r.grades().size(); i++) if (r.grades().get(i).name().equals(g.grade())) return i;
        return -1;
    }

    @Property(tries = 10_000, seed = "7001")
    void grading_isMonotonicInThePrimaryValue_forEveryShippedRecipe(@ForAll @IntRange(min = 0, max = 3) int which,
            @ForAll @DoubleRange(min = -40, max = 40) double devA, @ForAll @DoubleRange(min = -40, max = 40) double devB,
            @ForAll @DoubleRange(min = 0, max = 1) double u) {
        Recipe r = SHIPPED.get(which);
        double lo = Math.min(devA, devB), hi = Math.max(devA, devB);
        if (hi - lo < 1e-6) return;
        double d = lossFor(r, u);
        Grading a = grade(r, withValue(r, r.nominal() * (1 + lo / 100), d));
        Grading b = grade(r, withValue(r, r.nominal() * (1 + hi / 100), d));
        Grading mid = grade(r, withValue(r, r.nominal() * (1 + (lo + hi) / 200), d));
        assertTrue(a.devPct() < mid.devPct() && mid.devPct() < b.devPct(), "deviation rises with the value: " + a + " / " + b);
        // The graded value is the part's value in the recipe's one model: no jump where |Z| crosses a threshold.
        assertEquals(lo, a.devPct(), 1e-6 * (1 + Math.abs(lo)), "graded on the recipe's model: " + a);
        assertEquals(hi, b.devPct(), 1e-6 * (1 + Math.abs(hi)), "graded on the recipe's model: " + b);
        if (a.reason().code().equals("value-high")) assertEquals("value-high", b.reason().code(), "above the top stays above");
        if (b.reason().code().equals("value-low")) assertEquals("value-low", a.reason().code(), "below the bottom stays below");
        if (a.verdict() == Verdict.PASS && b.verdict() == Verdict.PASS) {
            int ia = index(r, a), ib = index(r, b), im = index(r, mid);
            if (r.mode() == GradingMode.LADDER) {
                assertTrue(ia <= ib, "ladder ranges climb with the value");
                if (ia == ib) assertEquals(ia, im, "no hole inside one range");
            } else {
                if (hi <= 0) assertTrue(ia >= ib, "below nominal, nearer is tighter");
                if (lo >= 0) assertTrue(ia <= ib, "above nominal, farther is wider");
                assertEquals(Verdict.PASS, mid.verdict(), "no hole between two accepted values");
                assertTrue(im <= Math.max(ia, ib), "between two accepted values the grade is as tight or tighter");
            }
        }
    }

    @Provide
    Arbitrary<Recipe> generatedRecipes() {
        Arbitrary<GradingMode> mode = Arbitraries.of(GradingMode.values());
        Arbitrary<List<Double>> widths = Arbitraries.doubles().between(0.5, 15).list().ofMinSize(1).ofMaxSize(4);
        Arbitrary<Double> asym = Arbitraries.doubles().between(0.3, 3);
        Arbitrary<Double> u = Arbitraries.doubles().between(0, 0.5);
        return Combinators.combine(mode, widths, asym, u).as((m, ws, k, g) -> {
            List<Grade> grades = new ArrayList<>();
            double acc = 0;
            if (m == GradingMode.CONCENTRIC) {
                for (int i = 0; i < ws.size(); i++) {
                    acc += ws.get(i);
                    grades.add(new Grade("G" + i, i + 1, -Math.min(acc, 90), acc * k));
                }
            } else {
                double edge = -Math.min(ws.stream().mapToDouble(x -> x).sum() / 2, 90);
                for (int i = 0; i < ws.size(); i++) {
                    double next = edge + ws.get(i);
                    grades.add(new Grade("G" + i, i + 1, edge, next));
                    edge = next;
                }
            }
            try {
                return new Recipe("gen", PartType.CAPACITOR, 100e-9, new TestConditions(1000, 1, "medium", 1), ModelPolicy.DEFAULT,
                        PrimaryParam.CS, m, grades, new GuardBand(g, true), Gates.NONE, null,
                        new RejectBins(20, 21, 22, 23, 24, 25, 26), new RetestPolicy(1, 0), ContactCheck.DEFAULT, false);
            } catch (RuntimeException e) {
                return null; // a guard band that leaves a grade no room: not a recipe
            }
        }).filter(x -> x != null);
    }

    /** {@code tune} counts by the rule's bands: at every edge, just beside it and anywhere, a band gives the rule's outcome. */
    @Property(tries = 3_000, seed = "7006")
    void valueBands_giveTheRulesOutcome_atEveryEdgeAndBetween(@ForAll("generatedRecipes") Recipe r,
            @ForAll @DoubleRange(min = -100, max = 100) double dev) {
        net.zbin.core.ValueBands bands = net.zbin.core.ValueBands.of(r);
        List<Double> probes = new ArrayList<>(List.of(dev, -1e9, 1e9));
        for (double e : Grader.valueEdges(r)) probes.addAll(List.of(e, Math.nextUp(e), Math.nextDown(e)));
        for (double x : probes) assertEquals(Grader.byValue(r, x), bands.outcome(x), "deviation " + x + " % in " + r.grades());
    }

    @Property(tries = 10_000, seed = "7002")
    void aGuardBand_neverWidensAcceptance(@ForAll("generatedRecipes") Recipe guarded,
            @ForAll @DoubleRange(min = -60, max = 60) double dev) {
        Recipe plain = new Recipe(guarded.name(), guarded.partType(), guarded.nominal(), guarded.test(), guarded.model(),
                guarded.primary(), guarded.mode(), guarded.grades(), GuardBand.NONE, guarded.gates(), guarded.plausible(),
                guarded.reject(), guarded.retest(), guarded.contact(), false);
        Impedance z = withValue(guarded, guarded.nominal() * (1 + dev / 100), 0.001);
        Grading g = grade(guarded, z), p = grade(plain, z);
        if (g.verdict() == Verdict.PASS) {
            assertEquals(Verdict.PASS, p.verdict(), "accepted with a guard band → accepted without");
            if (guarded.mode() == GradingMode.LADDER) assertEquals(p.grade(), g.grade());
            else assertTrue(index(guarded, g) >= index(plain, p), "the guarded grade is never tighter");
        }
    }

    /**
     * Recipes of any part type, nominal and frequency, with generous contact factors and the widest
     * phase window, so that only the fixture's own bounds stand between a fixture reading and a pass.
     */
    @Provide
    Arbitrary<Recipe> anyRecipe() {
        Arbitrary<PartType> type = Arbitraries.of(PartType.values());
        Arbitrary<Double> logNominal = Arbitraries.doubles().between(0, 1);
        Arbitrary<Double> logFreq = Arbitraries.doubles().between(2, 6);
        Arbitrary<Double> openFactor = Arbitraries.doubles().between(2, 1e4);
        return Combinators.combine(type, logNominal, logFreq, openFactor).as((t, ln, lf, of) -> {
            double nominal = switch (t) {
                case CAPACITOR -> Math.pow(10, -13 + 10 * ln);
                case INDUCTOR -> Math.pow(10, -8 + 8 * ln);
                case RESISTOR -> Math.pow(10, -3 + 11 * ln);
            };
            PrimaryParam p = switch (t) { case CAPACITOR -> PrimaryParam.CS; case INDUCTOR -> PrimaryParam.LS; case RESISTOR -> PrimaryParam.RS; };
            var window = switch (t) {
                case CAPACITOR -> new net.zbin.core.PhaseWindow(-90, -0.001);
                case INDUCTOR -> new net.zbin.core.PhaseWindow(0.001, 90);
                case RESISTOR -> new net.zbin.core.PhaseWindow(-89.9, 89.9);
            };
            return new Recipe("any", t, nominal, new TestConditions(Math.pow(10, lf), 1, "medium", 1), ModelPolicy.DEFAULT, p,
                    GradingMode.CONCENTRIC, List.of(new Grade("W", 1, -50, 50)), GuardBand.NONE, Gates.NONE, window,
                    new RejectBins(20, 21, 22, 23, 24, 25, 26), new RetestPolicy(1, 0), new ContactCheck(of, 1e-4), false);
        });
    }

    @Property(tries = 10_000, seed = "7005")
    void aReadingTheFixtureItselfCouldGive_neverPasses_onAnyRecipe(@ForAll("anyRecipe") Recipe r,
            @ForAll boolean open, @ForAll boolean compensated,
            @ForAll @DoubleRange(min = 0, max = 1) double depth, @ForAll @DoubleRange(min = -90, max = 90) double thetaDeg) {
        fixtureReadingNeverPasses(r, open, compensated, depth, thetaDeg);
    }

    @Property(tries = 10_000, seed = "7003")
    void aReadingTheFixtureItselfCouldGive_neverPasses(@ForAll @IntRange(min = 0, max = 2) int which,
            @ForAll boolean open, @ForAll boolean compensated,
            @ForAll @DoubleRange(min = 0, max = 1) double depth, @ForAll @DoubleRange(min = -90, max = 90) double thetaDeg) {
        fixtureReadingNeverPasses(SHIPPED.get(which), open, compensated, depth, thetaDeg);
    }

    static void fixtureReadingNeverPasses(Recipe r, boolean open, boolean compensated, double depth, double thetaDeg) {
        FixtureBounds f = r.contact().fixture();
        double zOhm;
        if (open) {
            double edge = compensated ? 1 / (2 * Math.PI * r.freqHz() * f.openBandF()) : f.openZOhm(r.freqHz());
            zOhm = edge * Math.pow(10, 6 * depth); // from the edge of the band to 10⁶ × beyond
        } else {
            double edge = compensated ? f.shortBandOhm() : f.shortMaxOhm();
            zOhm = edge * Math.pow(10, -6 * depth);
        }
        Impedance z = Impedance.fromPolar(r.freqHz(), zOhm, thetaDeg);
        Grading g = compensated ? Grader.gradeCorrected(r, z, Reading.of(z), CompensationSource.USER, 0, true, true)
                : Grader.grade(r, Reading.of(z), null, 0);
        assertNotEquals(Verdict.PASS, g.verdict(), "|Z| " + zOhm + " Ω at " + thetaDeg + "°: " + g);
    }

    @Property(tries = 10_000, seed = "7004")
    void everyReading_landsInExactlyOneBinOfThePlan(@ForAll @IntRange(min = 0, max = 2) int which,
            @ForAll @DoubleRange(min = -12, max = 12) double logZ, @ForAll @DoubleRange(min = -90, max = 90) double thetaDeg,
            @ForAll @IntRange(min = 0, max = 3) int attempt, @ForAll boolean withComp) {
        Recipe r = SHIPPED.get(which);
        double near = r.idealZOhm() * Math.pow(10, logZ / 12 * 2); // two decades either side of the nominal, and beyond
        Impedance z = Impedance.fromPolar(r.freqHz(), near, thetaDeg);
        Compensation c = withComp ? new Compensation(r.freqHz(), CompensationSource.USER, Instant.EPOCH,
                Compensation.openFromAdmittance(r.freqHz(), 1e-12, 0), new Impedance(r.freqHz(), 1e-3, 1e-4), null, null) : null;
        Grading g = Grader.grade(r, Reading.of(z), c, attempt);
        Set<Integer> passBins = new HashSet<>();
        for (Grade gr : r.grades()) passBins.add(gr.bin());
        Set<Integer> plan = new HashSet<>(passBins);
        for (int b : r.reject().all()) plan.add(b);
        plan.add(r.retest().bin());
        assertTrue(plan.contains(g.bin()), "bin " + g.bin() + " is in the plan");
        assertEquals(g.verdict() == Verdict.PASS, passBins.contains(g.bin()), "a pass bin if and only if passed: " + g);
        if (g.verdict() == Verdict.RETEST) assertEquals(r.retest().bin(), g.bin());
    }
}
