package net.zbin.core;

/**
 * How the line monitor watches a lot. The drift charts are designed from a stated false-alarm budget
 * (see {@link ChartDesign}): by default at most one false drift alarm per 8-hour shift, all four charts
 * together (EWMA and CUSUM on the value and on the loss), at 30 parts/s, tuned to catch a shift of a
 * third of the parts' σ fastest. The baseline is learned over the first 10 000 graded parts of a lot
 * (its error is accounted for in the design); chart points are means of 25 parts; an alarm clears after
 * 500 parts without a signal; windows of the last 1 000 presentations.
 *
 * @param learnParts          parts of a lot the baseline is learned from (≥ 10)
 * @param subgroup            consecutive parts averaged into one chart point (1 = every part)
 * @param falseAlarmsPerShift false drift alarms a stable line may raise per shift, all charts together
 * @param shiftH              length of a shift in hours
 * @param partsPerS           the line's rate in parts per second, for the budget (the highest it runs at)
 * @param detectShiftSigma    the shift of the mean, in σ of one part, the charts are tuned to catch fastest
 * @param ewmaLambda          EWMA weight (NaN: 0.2)
 * @param ewmaL               EWMA limit width in σ of the statistic (NaN: designed from the budget)
 * @param cusumK              CUSUM allowance in σ of a chart point (NaN: half the shift to catch)
 * @param cusumH              CUSUM decision interval in σ of a chart point (NaN: designed from the budget)
 * @param clearAfter          parts without a signal before a drift alarm clears
 * @param windowParts         presentations in the rolling window
 * @param maxNegativeRPct     negative-r share of the window that raises negative-r-rate, in %
 * @param compMaxAgeH         compensation older than this raises compensation-old, in hours
 * @param baselineMeanPct     the value's baseline deviation in % when stated by the recipe (NaN: learned from the lot)
 * @param baselineSigmaPct    its σ per part in % (NaN: learned)
 */
public record MonitorSettings(int learnParts, int subgroup, double falseAlarmsPerShift, double shiftH, double partsPerS,
                              double detectShiftSigma, double ewmaLambda, double ewmaL, double cusumK, double cusumH, int clearAfter,
                              int windowParts, double maxNegativeRPct, double compMaxAgeH, double baselineMeanPct, double baselineSigmaPct) {
    public static final MonitorSettings DEFAULT = new MonitorSettings(10_000, 25, 1, 8, 30, 1.0 / 3, Double.NaN, Double.NaN, Double.NaN,
            Double.NaN, 500, 1000, 1.0, 8, Double.NaN, Double.NaN);

    /** Whether the recipe states the value's baseline. */
    public boolean statedBaseline() { return !Double.isNaN(baselineSigmaPct); }

    /** The charts' parameters and run lengths (designed once per distinct setting and kept). */
    public ChartDesign design() { return ChartDesign.of(this); }

    public MonitorSettings withCompMaxAgeH(double h) { return toBuilder().compMaxAgeH(h).build(); }

    public MonitorSettings withBaseline(double meanPct, double sigmaPct) { return toBuilder().baselineMeanPct(meanPct).baselineSigmaPct(sigmaPct).build(); }

    /** A builder holding these settings (the defaults' for {@link #builder}); {@link Builder#build} validates. */
    public Builder toBuilder() { return new Builder(this); }

    public static Builder builder() { return new Builder(DEFAULT); }

    /** The one place monitor settings are put together: a new {@code monitor:} key is a field here and in the record. */
    public static final class Builder {
        private int learnParts, subgroup, clearAfter, windowParts;
        private double falseAlarmsPerShift, shiftH, partsPerS, detectShiftSigma, ewmaLambda, ewmaL, cusumK, cusumH, maxNegativeRPct,
                compMaxAgeH, baselineMeanPct, baselineSigmaPct;

        private Builder(MonitorSettings m) {
            learnParts = m.learnParts;
            subgroup = m.subgroup;
            falseAlarmsPerShift = m.falseAlarmsPerShift;
            shiftH = m.shiftH;
            partsPerS = m.partsPerS;
            detectShiftSigma = m.detectShiftSigma;
            ewmaLambda = m.ewmaLambda;
            ewmaL = m.ewmaL;
            cusumK = m.cusumK;
            cusumH = m.cusumH;
            clearAfter = m.clearAfter;
            windowParts = m.windowParts;
            maxNegativeRPct = m.maxNegativeRPct;
            compMaxAgeH = m.compMaxAgeH;
            baselineMeanPct = m.baselineMeanPct;
            baselineSigmaPct = m.baselineSigmaPct;
        }

        public Builder learnParts(int v) { learnParts = v; return this; }
        public Builder subgroup(int v) { subgroup = v; return this; }
        public Builder falseAlarmsPerShift(double v) { falseAlarmsPerShift = v; return this; }
        public Builder shiftH(double v) { shiftH = v; return this; }
        public Builder partsPerS(double v) { partsPerS = v; return this; }
        public Builder detectShiftSigma(double v) { detectShiftSigma = v; return this; }
        public Builder ewmaLambda(double v) { ewmaLambda = v; return this; }
        public Builder ewmaL(double v) { ewmaL = v; return this; }
        public Builder cusumK(double v) { cusumK = v; return this; }
        public Builder cusumH(double v) { cusumH = v; return this; }
        public Builder clearAfter(int v) { clearAfter = v; return this; }
        public Builder windowParts(int v) { windowParts = v; return this; }
        public Builder maxNegativeRPct(double v) { maxNegativeRPct = v; return this; }
        public Builder compMaxAgeH(double v) { compMaxAgeH = v; return this; }
        public Builder baselineMeanPct(double v) { baselineMeanPct = v; return this; }
        public Builder baselineSigmaPct(double v) { baselineSigmaPct = v; return this; }

        public MonitorSettings build() {
            return new MonitorSettings(learnParts, subgroup, falseAlarmsPerShift, shiftH, partsPerS, detectShiftSigma, ewmaLambda, ewmaL,
                    cusumK, cusumH, clearAfter, windowParts, maxNegativeRPct, compMaxAgeH, baselineMeanPct, baselineSigmaPct);
        }
    }

    public MonitorSettings {
        if (learnParts < 10 || learnParts > 1_000_000) throw new SpecException("monitor.learn_parts", "must be 10..1000000 (was " + learnParts + ")");
        if (subgroup < 1 || subgroup > 1000) throw new SpecException("monitor.subgroup", "must be 1..1000 (was " + subgroup + ")");
        if (learnParts < 2 * subgroup)
            throw new SpecException("monitor.learn_parts", "must be at least two subgroups (" + 2 * subgroup + " parts; was " + learnParts + ")");
        if (!(falseAlarmsPerShift >= 0.001 && falseAlarmsPerShift <= 100))
            throw new SpecException("monitor.false_alarms_per_shift", "must be 0.001..100 (was " + falseAlarmsPerShift + ")");
        if (!(shiftH > 0 && shiftH <= 24)) throw new SpecException("monitor.shift_h", "must be > 0 and <= 24 hours (was " + shiftH + ")");
        if (!(partsPerS > 0 && partsPerS <= 1000)) throw new SpecException("monitor.parts_per_s", "must be > 0 and <= 1000 (was " + partsPerS + ")");
        if (!(detectShiftSigma > 0 && detectShiftSigma <= 5))
            throw new SpecException("monitor.detect_shift_sigma", "must be > 0 and <= 5 (was " + detectShiftSigma + ")");
        if (!Double.isNaN(ewmaLambda)) new EwmaChart(ewmaLambda, 1);
        if (!Double.isNaN(ewmaL)) new EwmaChart(0.5, ewmaL);
        if (!Double.isNaN(cusumK)) new CusumChart(cusumK, 1);
        if (!Double.isNaN(cusumH)) new CusumChart(0, cusumH);
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
