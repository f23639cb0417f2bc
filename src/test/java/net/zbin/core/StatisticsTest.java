package net.zbin.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;
import org.junit.jupiter.api.Test;

/** Running statistics, capability and control charts against published values. */
class StatisticsTest {
    static RunningStats numAcc(double c) {
        RunningStats s = new RunningStats();
        s.add(c + 0.2);
        for (int i = 0; i < 500; i++) {
            s.add(c + 0.1);
            s.add(c + 0.3);
        }
        return s;
    }

    @Test
    void welford_onTheNistStrdUnivariateSets() {
        // NIST StRD univariate summary statistics, NumAcc1: 10000001, 10000003, 10000002 → mean 10000002, s 1 (certified).
        RunningStats a = new RunningStats();
        for (double x : new double[] {10000001, 10000003, 10000002}) a.add(x);
        assertEquals(10000002, a.mean(), 0);
        assertEquals(1, a.stdDev(), 1e-12);
        // NumAcc2, 3, 4: c + 0.2, then 500 pairs (c + 0.1, c + 0.3), c = 1, 10⁶, 10⁷ → mean c + 0.2, s 0.1 (certified).
        double[][] sets = {{1, 1e-13}, {1e6, 1e-9}, {1e7, 1e-8}}; // c, relative error allowed for s in doubles
        for (double[] set : sets) {
            RunningStats s = numAcc(set[0]);
            assertEquals(1001, s.count());
            assertEquals(set[0] + 0.2, s.mean(), (set[0] + 0.2) * 1e-15 * 10);
            assertEquals(0.1, s.stdDev(), 0.1 * set[1], "NumAcc with c = " + set[0]);
        }
    }

    @Test
    void welford_keepsTheVarianceWhereTheNaiveFormulaLosesIt() {
        // Welford 1962, Technometrics 4(3): 4, 7, 13, 16 has variance 30 (by hand); shifted by 10⁹ the naive Σx² − (Σx)²/n fails, Welford does not.
        double[] xs = {4, 7, 13, 16};
        RunningStats s = new RunningStats();
        double sum = 0, sq = 0;
        for (double x : xs) {
            s.add(x + 1e9);
            sum += x + 1e9;
            sq += (x + 1e9) * (x + 1e9);
        }
        assertEquals(30, s.variance(), 1e-6);
        double naive = (sq - sum * sum / 4) / 3;
        assertTrue(Math.abs(naive - 30) > 1, "the naive formula is off: " + naive);
    }

    @Test
    void capability_byTheIsoDefinitions() {
        // ISO 22514-2 definitions (Cp = (USL − LSL)/6σ, Cpk = min(USL − μ, μ − LSL)/3σ), worked by hand: USL 62, LSL 38, μ 53, σ 2 → Cp 2.0, Cpk 1.5.
        assertEquals(2.0, Capability.cp(38, 62, 2), 1e-12);
        assertEquals(1.5, Capability.cpk(38, 62, 53, 2), 1e-12);
        assertTrue(Double.isNaN(Capability.cp(38, 62, 0)));
    }

    /** Mean run length until the first signal, for points N(shift, 1), over {@code runs} seeded runs. */
    static double[] arl(java.util.function.Supplier<java.util.function.DoublePredicate> chart, double shift, int runs, long seed) {
        Random rnd = new Random(seed);
        RunningStats len = new RunningStats();
        for (int r = 0; r < runs; r++) {
            var c = chart.get();
            long n = 0;
            while (true) {
                n++;
                if (c.test(rnd.nextGaussian() + shift)) break;
            }
            len.add(n);
        }
        return new double[] {len.mean(), len.stdDev() / Math.sqrt(runs)};
    }

    static void within(double published, double[] mc, String what) {
        // Monte Carlo: the estimate must lie within 4 standard errors of the published ARL (or 3 % of it, for tiny SE).
        double tol = Math.max(4 * mc[1], 0.03 * published);
        assertEquals(published, mc[0], tol, what + ": simulated " + mc[0] + " ± " + mc[1]);
    }

    @Test
    void cusum_averageRunLengths_matchLucasAndCrosier() {
        // Lucas & Crosier 1982, Technometrics 24, Table 1 (two-sided, k = 0.5, zero start):
        // h = 4: ARL 168 in control, 26.6 at 0.5σ, 8.38 at 1σ, 3.34 at 2σ; h = 5: 465, 38.0, 10.4, 4.01.
        double[][] table = {{4, 0, 168}, {4, 0.5, 26.6}, {4, 1, 8.38}, {4, 2, 3.34}, {5, 0, 465}, {5, 0.5, 38.0}, {5, 1, 10.4}, {5, 2, 4.01}};
        long seed = 11;
        for (double[] row : table) {
            double h = row[0];
            double[] mc = arl(() -> {
                CusumChart c = new CusumChart(0.5, h);
                return x -> c.add(x) != 0;
            }, row[1], 4000, seed++);
            within(row[2], mc, "CUSUM h " + h + " shift " + row[1]);
        }
    }

    @Test
    void ewma_averageRunLengths_matchLucasAndSaccucci() {
        // Lucas & Saccucci 1990, Technometrics 32 (asymptotic limits): λ 0.10, L 2.814: ARL 500, 31.3 (0.5σ), 10.3 (1σ), 4.4 (2σ);
        // λ 0.20, L 2.962: 500, 41.8, 10.5, 3.7.
        double[][] table = {{0.10, 2.814, 0, 500}, {0.10, 2.814, 0.5, 31.3}, {0.10, 2.814, 1, 10.3}, {0.10, 2.814, 2, 4.4},
                {0.20, 2.962, 0, 500}, {0.20, 2.962, 0.5, 41.8}, {0.20, 2.962, 1, 10.5}, {0.20, 2.962, 2, 3.7}};
        long seed = 101;
        for (double[] row : table) {
            double[] mc = arl(() -> {
                EwmaChart e = new EwmaChart(row[0], row[1], false);
                return e::add;
            }, row[2], row[2] == 0 ? 3000 : 4000, seed++);
            within(row[3], mc, "EWMA λ " + row[0] + " shift " + row[2]);
        }
    }

    @Test
    void ewmaWithExactLimits_signalsNoLaterThanWithAsymptoticOnes() {
        // The exact limits are narrower for the first points, so a shift present from the start is found sooner.
        double[] exact = arl(() -> {
            EwmaChart e = new EwmaChart(0.1, 2.814, true);
            return e::add;
        }, 1, 4000, 7);
        double[] asym = arl(() -> {
            EwmaChart e = new EwmaChart(0.1, 2.814, false);
            return e::add;
        }, 1, 4000, 7);
        assertTrue(exact[0] < asym[0], exact[0] + " vs " + asym[0]);
        EwmaChart e = new EwmaChart(0.1, 2.814);
        e.add(0);
        assertEquals(2.814 * Math.sqrt(0.1 / 1.9 * (1 - Math.pow(0.9, 2))), e.limit(), 1e-12); // first point's exact limit
    }
}
