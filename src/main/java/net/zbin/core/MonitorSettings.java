package net.zbin.core;

/**
 * How the line monitor watches a lot. Defaults (common practice): the baseline is learned over the
 * first 2 000 parts of a lot (80 chart points, so the baseline itself does not shorten the in-control run length much); the charts take means of subgroups of 25 parts; EWMA λ 0.10, L 2.814 (in-control
 * ARL 500 subgroups, Lucas & Saccucci 1990); tabular CUSUM k 0.5, h 5 (in-control ARL 465 subgroups, Lucas
 * & Crosier 1982); an alarm clears after 500 parts without a signal; windows of the last 1 000 presentations.
 *
 * @param learnParts     parts of a lot the baseline is learned from (≥ 10)
 * @param subgroup       consecutive parts averaged into one chart point (1 = every part)
 * @param ewmaLambda     EWMA weight
 * @param ewmaL          EWMA limit width
 * @param cusumK         CUSUM allowance in σ
 * @param cusumH         CUSUM decision interval in σ
 * @param clearAfter     parts without a signal before a drift alarm clears
 * @param windowParts    presentations in the rolling window
 * @param maxNegativeRPct negative-r share of the window that raises negative-r-rate, in %
 * @param compMaxAgeH    compensation older than this raises compensation-old, in hours
 * @param baselineMeanPct the value's baseline deviation in % when stated by the recipe (NaN: learned from the lot)
 * @param baselineSigmaPct its σ per part in % (NaN: learned)
 */
public record MonitorSettings(int learnParts, int subgroup, double ewmaLambda, double ewmaL, double cusumK, double cusumH, int clearAfter,
                              int windowParts, double maxNegativeRPct, double compMaxAgeH, double baselineMeanPct, double baselineSigmaPct) {
    public static final MonitorSettings DEFAULT = new MonitorSettings(2000, 25, 0.10, 2.814, 0.5, 5, 500, 1000, 1.0, 8, Double.NaN, Double.NaN);

    /** With the value's baseline learned from each lot. */
    public MonitorSettings(int learnParts, int subgroup, double ewmaLambda, double ewmaL, double cusumK, double cusumH, int clearAfter,
                           int windowParts, double maxNegativeRPct, double compMaxAgeH) {
        this(learnParts, subgroup, ewmaLambda, ewmaL, cusumK, cusumH, clearAfter, windowParts, maxNegativeRPct, compMaxAgeH, Double.NaN, Double.NaN);
    }

    /** Whether the recipe states the value's baseline. */
    public boolean statedBaseline() { return !Double.isNaN(baselineSigmaPct); }

    public MonitorSettings {
        if (learnParts < 10 || learnParts > 100_000) throw new SpecException("monitor.learn_parts", "must be 10..100000 (was " + learnParts + ")");
        if (subgroup < 1 || subgroup > 1000) throw new SpecException("monitor.subgroup", "must be 1..1000 (was " + subgroup + ")");
        new EwmaChart(ewmaLambda, ewmaL);
        new CusumChart(cusumK, cusumH);
        if (clearAfter < 1) throw new SpecException("monitor.clear_after", "must be >= 1 (was " + clearAfter + ")");
        if (windowParts < 10 || windowParts > 1_000_000) throw new SpecException("monitor.window_parts", "must be 10..1000000 (was " + windowParts + ")");
        if (!(maxNegativeRPct > 0 && maxNegativeRPct <= 100)) throw new SpecException("monitor.max_negative_r_pct", "must be > 0 and <= 100 (was " + maxNegativeRPct + ")");
        if (!(compMaxAgeH > 0)) throw new SpecException("monitor.compensation_max_age_h", "must be > 0 (was " + compMaxAgeH + ")");
        if (Double.isNaN(baselineMeanPct) != Double.isNaN(baselineSigmaPct))
            throw new SpecException("monitor.baseline_sigma_pct", "give baseline_mean_pct and baseline_sigma_pct together");
        if (!Double.isNaN(baselineSigmaPct) && !(baselineSigmaPct > 0))
            throw new SpecException("monitor.baseline_sigma_pct", "must be > 0 (was " + baselineSigmaPct + ")");
    }
}
