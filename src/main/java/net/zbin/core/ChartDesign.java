package net.zbin.core;

import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.DoubleUnaryOperator;
import org.apache.commons.math3.analysis.integration.gauss.GaussIntegratorFactory;
import org.apache.commons.math3.analysis.solvers.BrentSolver;

/**
 * The drift charts designed from a false-alarm budget. A shift of {@code shiftH} hours at {@code partsPerS}
 * gives P = partsPerS·3600·shiftH / subgroup chart points per quantity; the monitor runs four charts (EWMA
 * and CUSUM on the value and on the loss) and raises an alarm on the first signal of any, so the expected
 * false alarms per shift are at most P·Σ 1/ARLᵢ (by linearity of expectation, whatever the charts' dependence).
 * Each chart gets a quarter of the budget: its limit (CUSUM h, EWMA L) is solved so that its false-alarm rate
 * per point is {@code falseAlarmsPerShift}/(4·P).
 *
 * <p>The rate is the in-control rate averaged over the error of a learned baseline: the baseline mean of m
 * learned chart points is off by ε ~ N(0, 1/m) in σ of a point, and a chart whose centre is off runs as if
 * shifted by ε, so the design uses E[1/ARL(ε)] (Gauss–Hermite, 9 nodes) rather than 1/ARL(0). Run lengths
 * come from {@link RunLength} (Brook &amp; Evans 1972; Lucas &amp; Saccucci 1990).
 *
 * <p>The CUSUM allowance is k = δ/2 for the shift to catch δ = detectShiftSigma·√subgroup in σ of a point
 * (the optimal k of a CUSUM for a step of δ; Moustakides 1986); the EWMA weight is 0.2 unless stated.
 *
 * @param k                     CUSUM allowance, σ of a point
 * @param h                     CUSUM decision interval, σ of a point
 * @param lambda                EWMA weight
 * @param limitL                EWMA limit width, σ of the statistic (asymptotic limits)
 * @param designedH             whether h was solved from the budget (false: stated by the recipe)
 * @param designedL             whether L was solved from the budget
 * @param pointsPerShift        chart points per quantity in one shift at the stated rate
 * @param learnedPoints         chart points the baseline is learned from (the design assumes a learned baseline's error even for a stated one)
 * @param cusumArl0             in-control ARL of one CUSUM in points, with a known baseline
 * @param ewmaArl0              the same for one EWMA
 * @param falseAlarmsPerShift   expected false drift alarms per shift, all four charts, with the learned baseline's error
 * @param shiftPoint            the shift to catch in σ of a point
 * @param cusumArlShift         ARL of the CUSUM at that shift, in points
 * @param ewmaArlShift          ARL of the EWMA at that shift, in points
 */
public record ChartDesign(double k, double h, double lambda, double limitL, boolean designedH, boolean designedL, double pointsPerShift,
                          double learnedPoints, double cusumArl0, double ewmaArl0, double falseAlarmsPerShift, double shiftPoint,
                          double cusumArlShift, double ewmaArlShift) {
    /** Charts that can raise a drift alarm: EWMA and CUSUM on the value and on the loss. */
    public static final int CHARTS = 4;
    public static final double DEFAULT_LAMBDA = 0.2;

    private static final Map<MonitorSettings, ChartDesign> MEMO = new ConcurrentHashMap<>();
    private static final double[] NODES, WEIGHTS;

    static {
        var rule = new GaussIntegratorFactory().hermite(9);
        NODES = new double[rule.getNumberOfPoints()];
        WEIGHTS = new double[NODES.length];
        for (int i = 0; i < NODES.length; i++) {
            NODES[i] = rule.getPoint(i);
            WEIGHTS[i] = rule.getWeight(i);
        }
    }

    /** The design for these settings (computed once per distinct setting, tens of milliseconds). */
    public static ChartDesign of(MonitorSettings s) {
        return MEMO.computeIfAbsent(s.withCompMaxAgeH(1).withBaseline(Double.NaN, Double.NaN), ChartDesign::design);
    }

    private static ChartDesign design(MonitorSettings s) {
        int n = s.subgroup();
        double p = s.partsPerS() * 3600 * s.shiftH() / n;
        double m = (double) s.learnParts() / n;
        double perChart = s.falseAlarmsPerShift() / (CHARTS * p);
        double shift = s.detectShiftSigma() * Math.sqrt(n);
        double k = Double.isNaN(s.cusumK()) ? shift / 2 : s.cusumK();
        double lambda = Double.isNaN(s.ewmaLambda()) ? DEFAULT_LAMBDA : s.ewmaLambda();
        double sd = 1 / Math.sqrt(m);
        DoubleUnaryOperator cusumRate = h -> averaged(e -> 1 / RunLength.cusum(k, h, e), sd);
        DoubleUnaryOperator ewmaRate = l -> averaged(e -> 1 / RunLength.ewma(lambda, l, e), sd);
        double h = Double.isNaN(s.cusumH()) ? solve(cusumRate, perChart, 0.5, 40) : s.cusumH();
        double l = Double.isNaN(s.ewmaL()) ? solve(ewmaRate, perChart, 1.0, 12) : s.ewmaL();
        double expected = 2 * p * (cusumRate.applyAsDouble(h) + ewmaRate.applyAsDouble(l));
        return new ChartDesign(k, h, lambda, l, Double.isNaN(s.cusumH()), Double.isNaN(s.ewmaL()), p, m, RunLength.cusum(k, h, 0),
                RunLength.ewma(lambda, l, 0), expected, shift, RunLength.cusum(k, h, shift), RunLength.ewma(lambda, l, shift));
    }

    /** E[f(ε)] for ε ~ N(0, sd²); f even, so each ± pair of nodes is evaluated once. */
    static double averaged(DoubleUnaryOperator f, double sd) {
        double sum = 0;
        for (int i = 0; i < NODES.length; i++) {
            if (NODES[i] < -1e-12) continue;
            double w = NODES[i] > 1e-12 ? 2 * WEIGHTS[i] : WEIGHTS[i];
            sum += w * f.applyAsDouble(Math.sqrt(2) * sd * NODES[i]);
        }
        return sum / Math.sqrt(Math.PI);
    }

    /** The limit in [lo, hi] whose false-alarm rate per point is the target (the rate falls as the limit grows). */
    private static double solve(DoubleUnaryOperator rate, double target, double lo, double hi) {
        double logTarget = Math.log(target);
        if (Math.log(rate.applyAsDouble(hi)) > logTarget) return hi;
        if (Math.log(rate.applyAsDouble(lo)) < logTarget) return lo;
        return new BrentSolver(1e-6).solve(60, x -> Math.log(rate.applyAsDouble(x)) - logTarget, lo, hi);
    }

    /**
     * Expected parts until the charts signal at a shift of {@code shiftPartSigma} σ of one part, zero start: the
     * smaller of the two charts' ARLs times the subgroup (an upper bound, since either chart's signal counts).
     */
    public double partsToSignal(double shiftPartSigma, int subgroup) {
        double mu = shiftPartSigma * Math.sqrt(subgroup);
        return Math.min(RunLength.cusum(k, h, mu), RunLength.ewma(lambda, limitL, mu)) * subgroup;
    }
}
