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

    /**
     * How far a known limit's false-alarm rate per point may lie from its share of the budget, as |ln(rate/share)|:
     * a fresh solve lands within about 1e-6; the margin allows another machine's last bits of {@code exp}.
     */
    static final double KNOWN_LIMIT_TOLERANCE = 1e-3;

    /** The design for these settings (computed once per distinct setting: 0.1–0.3 s, the most a line's start computes). */
    public static ChartDesign of(MonitorSettings s) { return MEMO.computeIfAbsent(key(s), k -> design(k, Double.NaN, Double.NaN)); }

    /** A design solved afresh, not remembered: what {@link #of} would give for settings it has not seen. */
    public static ChartDesign designed(MonitorSettings s) { return design(key(s), Double.NaN, Double.NaN); }

    /** Whether these settings' design is made already (in this process). */
    public static boolean known(MonitorSettings s) { return MEMO.containsKey(key(s)); }

    /** What a design depends on: the settings without the compensation age limit and a stated baseline. */
    public static MonitorSettings key(MonitorSettings s) { return s.withCompMaxAgeH(1).withBaseline(Double.NaN, Double.NaN); }

    /**
     * Takes limits solved before (a line keeps them in its state folder, so a restart need not solve again) as the
     * design for these settings — only if each designed limit meets its share of the false-alarm budget as a fresh
     * solve would ({@link #KNOWN_LIMIT_TOLERANCE}): checking costs two rate evaluations per chart where solving costs
     * a dozen, and nothing read back can hand the line limits the budget does not give. Limits the settings state
     * are the settings' own whatever is passed. Returns the design taken, or null (the settings are designed afresh
     * when asked for).
     */
    public static ChartDesign adopt(MonitorSettings s, double h, double limitL) {
        if (!(h > 0) || !(limitL > 0)) return null;
        MonitorSettings k = key(s);
        ChartDesign d = design(k, h, limitL);
        return d == null ? null : MEMO.computeIfAbsent(k, x -> d);
    }

    /**
     * Solves the limits the settings leave open, or with {@code knownH}/{@code knownL} (not NaN) checks those instead:
     * null when a known limit misses its share of the budget.
     */
    private static ChartDesign design(MonitorSettings s, double knownH, double knownL) {
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
        boolean designH = Double.isNaN(s.cusumH()), designL = Double.isNaN(s.ewmaL());
        double h = !designH ? s.cusumH() : Double.isNaN(knownH) ? solve(cusumRate, perChart, 0.5, 40) : knownH;
        double l = !designL ? s.ewmaL() : Double.isNaN(knownL) ? solve(ewmaRate, perChart, 1.0, 12) : knownL;
        double cusumAt = cusumRate.applyAsDouble(h), ewmaAt = ewmaRate.applyAsDouble(l);
        if (designH && !Double.isNaN(knownH) && !meets(cusumAt, perChart, h, 0.5, 40)) return null;
        if (designL && !Double.isNaN(knownL) && !meets(ewmaAt, perChart, l, 1.0, 12)) return null;
        double expected = 2 * p * (cusumAt + ewmaAt);
        return new ChartDesign(k, h, lambda, l, designH, designL, p, m, RunLength.cusum(k, h, 0),
                RunLength.ewma(lambda, l, 0), expected, shift, RunLength.cusum(k, h, shift), RunLength.ewma(lambda, l, shift));
    }

    /** A known limit is what a solve would give: at its share of the budget, or at the end of the range a solve clamps to. */
    private static boolean meets(double rate, double target, double limit, double lo, double hi) {
        double off = Math.log(rate) - Math.log(target);
        return Math.abs(off) <= KNOWN_LIMIT_TOLERANCE || limit == hi && off > 0 || limit == lo && off < 0;
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
