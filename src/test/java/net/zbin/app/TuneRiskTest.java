package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.Reader;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import net.zbin.core.Grade;
import net.zbin.core.Grader;
import net.zbin.core.Grading;
import net.zbin.core.Recipe;
import net.zbin.core.RecordedReading;
import net.zbin.core.Sweep;
import net.zbin.core.Tuner;
import net.zbin.core.Verdict;
import net.zbin.io.RecipeLoader;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.apache.commons.math3.special.Erf;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * {@code tune}'s false-accept and false-reject figures are the lot's global consumer's and producer's risk
 * (JCGM 106:2012 §9.5): held against the closed form of the normal–normal case and against a simulated lot
 * whose true values are known. The lot: true deviations N(0, 2 %), measurement σ 0.5 % (U = 1 %), one grade ±5 %.
 */
class TuneRiskTest {
    static final double SIGMA_P = 2, U = 1, T = 5;
    static final int PARTS = 200_000;

    @TempDir
    static Path dir;
    static Path lot;
    static Recipe recipe;
    static List<RecordedReading> rows;
    static final Map<Long, Double> trueValue = new HashMap<>();

    @BeforeAll
    static void simulateTheLot() throws Exception {
        lot = dir.resolve("known.csv");
        // The 4.99 kΩ scenario's spread 0.15 % × 13.333 = 2 %; the meter's normal-pace noise 2e-4 of |Z| × 25 = 0.5 % of R.
        // (A resistor, so that the noise on X does not reach the grade through D or a negative R.)
        Cli c = Cli.run("sim", "lot", "--scenario", "simulators/scenarios/harrowgate-resistor-4k99.yaml", "--parts", String.valueOf(PARTS),
                "--spread-x", "13.33333", "--offset-pct", "0", "--noise-x", "25", "--out", lot.toString());
        assertEquals(0, c.exit(), c.err());
        String text = Files.readString(Path.of("config/recipes/resistor-prec-4k99.yaml"));
        int a = text.indexOf("grades:"), b = text.indexOf("reject:");
        text = text.substring(0, a) + "grades:\n  - {name: J, bin: 1, tolerance: J}\nguard_band:\n  uncertainty_pct: 1\n" + text.substring(b);
        Path r = dir.resolve("one-grade.yaml");
        Files.writeString(r, text);
        recipe = RecipeLoader.load(r);
        rows = TuneTest.rows(lot);
        try (Reader in = Files.newBufferedReader(lot)) {
            long line = 2; // the header is line 1, as RecordedReading counts
            for (CSVRecord rec : CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(in)) {
                String v = rec.get("true_value");
                if (!v.isEmpty()) trueValue.put(line, Double.parseDouble(v));
                line++;
            }
        }
    }

    static double phi(double z) { return 0.5 * Erf.erfc(-z / Math.sqrt(2)); }

    static double g(double t) { return Math.exp(-t * t / (2 * SIGMA_P * SIGMA_P)) / (SIGMA_P * Math.sqrt(2 * Math.PI)); }

    /** Probability that a part of true deviation t is read inside the acceptance interval [lo, hi]. */
    static double accepted(double t, double lo, double hi) { return phi((hi - t) / (U / 2)) - phi((lo - t) / (U / 2)); }

    /** ∫ f over [a, b] by the composite midpoint rule on 200 000 steps (the integrands are smooth). */
    static double integrate(java.util.function.DoubleUnaryOperator f, double a, double b) {
        int n = 200_000;
        double h = (b - a) / n, sum = 0;
        for (int i = 0; i < n; i++) sum += f.applyAsDouble(a + (i + 0.5) * h);
        return sum * h;
    }

    /**
     * The global consumer's and producer's risk of JCGM 106:2012 §9.5.2 (eqs. 19 and 20: the joint density of the
     * true and measured value integrated over "true outside, read inside" and "true inside, read outside") for a
     * normal process N(0, σp²) and a normal measurement of σ u, by direct integration: [R_C, R_P] in %.
     */
    static double[] jcgm106(double lo, double hi) {
        double outside = integrate(t -> g(t) * accepted(t, lo, hi), T, T + 12 * SIGMA_P) + integrate(t -> g(t) * accepted(t, lo, hi), -T - 12 * SIGMA_P, -T);
        double inside = integrate(t -> g(t) * (1 - accepted(t, lo, hi)), -T, T);
        return new double[] {100 * outside, 100 * inside};
    }

    @Test
    void tuneRisk_matchesTheClosedFormGlobalRisk_within10Percent() throws Exception {
        // A lot that is exactly the model: true deviation t ~ N(0, 2 %), reading t + N(0, 0.5 %), as resistor readings (X = 0).
        Path exact = dir.resolve("normal-normal.csv");
        java.util.Random rnd = new java.util.Random(106);
        try (var w = Files.newBufferedWriter(exact);
             var p = new org.apache.commons.csv.CSVPrinter(w, CSVFormat.DEFAULT.builder().setHeader("freq_hz", "r_ohm", "x_ohm").get())) {
            for (int i = 0; i < 400_000; i++) {
                double x = SIGMA_P * rnd.nextGaussian() + U / 2 * rnd.nextGaussian();
                p.printRecord(recipe.freqHz(), recipe.nominal() * (1 + x / 100), 0.0);
            }
        }
        Tuner tuner = new Tuner(recipe, List.of(Sweep.parse("guard=0,1", recipe.partType())), U);
        TuneTest.rows(exact).forEach(tuner::add);
        List<Tuner.Result> res = tuner.results();
        for (int i = 0; i < 2; i++) {
            // guard = U % of the limit's value: 1.05 % of nominal at +5 %, 0.95 % at −5 %, so −4.05 % … +3.95 % is accepted
            double guard = i == 0 ? 0 : U;
            double[] closed = jcgm106(-T + guard * (1 - T / 100), T - guard * (1 + T / 100));
            Tuner.Result r = res.get(i);
            System.out.printf(Locale.ROOT, "guard %.1f: tune false accept %.4f %% vs JCGM 106 %.4f %%; false reject %.4f %% vs %.4f %%%n", guard,
                    r.falseAcceptPct(), closed[0], r.falseRejectPct(), closed[1]);
            assertEquals(closed[0], r.falseAcceptPct(), 0.10 * closed[0], "false accept at guard " + guard);
            assertEquals(closed[1], r.falseRejectPct(), 0.10 * closed[1], "false reject at guard " + guard);
        }
        // The flat-prior estimate (the reading taken as the true value) would say about 0.59 % at guard 0: more than twice the truth.
        assertTrue(res.get(0).falseAcceptPct() < 0.3, "the lot's global risk, not a flat-prior sum: " + res.get(0).falseAcceptPct());
    }

    @Test
    void tuneRisk_matchesTheSimulatedLotsTruth() {
        Tuner tuner = new Tuner(recipe, List.of(Sweep.parse("guard=0,1", recipe.partType())), U);
        rows.forEach(tuner::add);
        List<Tuner.Result> res = tuner.results();
        for (int i = 0; i < 2; i++) {
            Recipe set = Sweep.parse("guard=" + (i == 0 ? 0 : U), recipe.partType()).apply(recipe, i == 0 ? 0 : U);
            Grade j = set.grades().get(0);
            long finished = 0, falseAccepts = 0, falseRejects = 0;
            for (RecordedReading row : rows) {
                if (row.isCheck()) continue;
                Grading gr = Grader.recorded(set, row);
                if (gr.verdict() == Verdict.RETEST) continue;
                finished++;
                Double tv = trueValue.get(row.line());
                if (tv == null) continue;
                double dev = (tv / set.nominal() - 1) * 100;
                boolean inSpec = dev >= j.lowPct() && dev <= j.highPct();
                if (gr.verdict() == Verdict.PASS && !inSpec) falseAccepts++;
                if (gr.verdict() != Verdict.PASS && inSpec && (gr.reason().code().startsWith("value") || gr.reason().code().equals("guard-band")))
                    falseRejects++;
            }
            double fa = 100.0 * falseAccepts / finished, fr = 100.0 * falseRejects / finished;
            Tuner.Result r = res.get(i);
            System.out.printf(Locale.ROOT, "guard %s: tune false accept %.4f %% vs the lot's truth %.4f %% (%d parts); false reject %.4f %% vs %.4f %%%n",
                    i == 0 ? "0" : "U", r.falseAcceptPct(), fa, falseAccepts, r.falseRejectPct(), fr);
            // The truth is a count: allow 4 of its standard errors (Poisson) or 15 %, whichever is wider.
            assertEquals(fa, r.falseAcceptPct(), Math.max(0.15 * fa, 4 * 100 * Math.sqrt(falseAccepts) / finished), "false accept");
            assertEquals(fr, r.falseRejectPct(), Math.max(0.15 * fr, 4 * 100 * Math.sqrt(falseRejects) / finished), "false reject");
        }
        assertTrue(res.get(1).falseAcceptPct() < res.get(0).falseAcceptPct());
    }
}
