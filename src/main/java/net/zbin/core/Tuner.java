package net.zbin.core;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Evaluates many candidate settings of a recipe on one recorded lot, each exactly as a replay with that
 * setting would grade it, without grading the lot once per setting where it need not.
 *
 * <p>Cost. The rows are read once (by the caller). When every varied quantity only changes the last,
 * by-value step of grading (grade limits, guard band), the lot is graded once with the base recipe: rows
 * that end before that step keep their outcome, and the deviations of the others are sorted once,
 * O(N log N); each setting is then counted by binary searches over the sorted deviations, O(G log N) for
 * G grades — K settings cost O(N log N + K·G·log N), not K replays. Other quantities (gates, nominal)
 * change earlier steps, so each of their settings regrades the kept rows, O(K·N), still without reading
 * the file again. The risk estimates are summed over the deviations grouped in bins of 0.01 % (O(B) a setting).
 *
 * <p>Risk. The global consumer's and producer's risk of JCGM 106:2012 §9.5 under the normal–normal model of
 * {@link RiskModel}, with the process estimated from the lot (σp² = s² − u²): false accept = the expected number of
 * accepted parts whose true value lies outside the limits of the grade that took them, false reject = the expected
 * number of parts rejected on their value whose true value lies inside the widest limits; both in % of the parts
 * finished. Per part, the probabilities are those of the true value given the reading under the process prior.
 * The sums run over deviations grouped in bins no wider than a tenth of the posterior σ (and 0.01 %), at each
 * bin's mean; a swept gate sums the same probabilities row by row.
 */
public final class Tuner {
    private final Recipe base;
    private final List<Sweep> sweeps;
    private final double uncertaintyPct;
    private final Counted counted;
    private final GateCounted gated;
    private final List<RecordedReading> kept;

    /** One setting's outcome. */
    public record Result(List<Double> values, String label, boolean valid, String problem, BinTally.Snapshot tally,
                         double falseAcceptPct, double falseRejectPct) {}

    /**
     * @param sweeps         one or two quantities and their values
     * @param uncertaintyPct the expanded uncertainty U (k = 2) of a reading in % of reading, for the risk estimates
     */
    public Tuner(Recipe base, List<Sweep> sweeps, double uncertaintyPct) {
        if (sweeps.isEmpty() || sweeps.size() > 2) throw new IllegalArgumentException("give one or two sweeps");
        this.base = base;
        this.sweeps = List.copyOf(sweeps);
        this.uncertaintyPct = uncertaintyPct;
        // A plan with later steps is replayed row by row for every setting: a later step judges only parts the value passes
        boolean steps = !base.steps().isEmpty();
        boolean fast = !steps && sweeps.stream().allMatch(Sweep::byValueOnly);
        counted = fast ? new Counted(base) : null;
        gated = !fast && !steps && sweeps.size() == 1 && sweeps.get(0).gate() ? new GateCounted(base, sweeps.get(0).quantity(), uncertaintyPct) : null;
        kept = counted == null && gated == null ? new ArrayList<>() : null;
    }

    /** One row of the lot, in file order. The fast paths keep only numbers, not the rows. */
    public void add(RecordedReading row) {
        if (counted != null) counted.add(row);
        else if (gated != null) gated.add(row);
        else kept.add(row);
    }

    /** Every combination of the sweeps' values, in order. */
    public List<Result> results() {
        seal();
        List<Result> out = new ArrayList<>();
        List<List<Double>> combos = new ArrayList<>();
        for (double a : sweeps.get(0).values())
            if (sweeps.size() == 1) combos.add(List.of(a));
            else for (double b : sweeps.get(1).values()) combos.add(List.of(a, b));
        for (List<Double> v : combos) {
            StringBuilder label = new StringBuilder();
            for (int i = 0; i < v.size(); i++) label.append(i == 0 ? "" : " ").append(sweeps.get(i).label(v.get(i)));
            Recipe r;
            try {
                r = Sweep.applyAll(base, sweeps, v);
            } catch (IllegalArgumentException e) {
                out.add(new Result(v, label.toString(), false, e.getMessage(), BinTally.Snapshot.EMPTY, Double.NaN, Double.NaN));
                continue;
            }
            BinTally t = counted != null ? counted.tally(r) : gated != null ? gated.tally(r, v.get(0)) : replay(r, kept);
            double[] risk = counted != null ? counted.risk(r, uncertaintyPct) : gated != null ? gated.risk(v.get(0))
                    : risk(r, devsAndProcess(r, kept), uncertaintyPct);
            BinTally.Snapshot s = t.snapshot();
            out.add(new Result(v, label.toString(), true, null, s, s.parts() == 0 ? Double.NaN : 100 * risk[0] / s.parts(),
                    s.parts() == 0 ? Double.NaN : 100 * risk[1] / s.parts()));
        }
        return out;
    }

    private void seal() {
        if (counted != null) counted.seal();
        if (gated != null) gated.seal();
    }

    /** The risk model of the lot under the base recipe (null without an uncertainty). */
    public RiskModel model() {
        if (!(uncertaintyPct > 0)) return null;
        seal();
        if (counted != null) return counted.model(uncertaintyPct);
        if (gated != null) return gated.model;
        double[] d = devsAndProcess(base, kept)[1];
        return RiskModel.fromLot(d, d.length, uncertaintyPct);
    }

    /** The indices 0..n−1 ordered by their key (a stable merge sort on primitives: no boxing of a million indices). */
    static int[] order(double[] key, int n) {
        int[] a = new int[n], tmp = new int[n];
        for (int i = 0; i < n; i++) a[i] = i;
        for (int width = 1; width < n; width *= 2) {
            for (int lo = 0; lo < n; lo += 2 * width) {
                int mid = Math.min(lo + width, n), hi = Math.min(lo + 2 * width, n), i = lo, j = mid, k = lo;
                while (i < mid && j < hi) tmp[k++] = key[a[j]] < key[a[i]] ? a[j++] : a[i++];
                while (i < mid) tmp[k++] = a[i++];
                while (j < hi) tmp[k++] = a[j++];
            }
            int[] t = a;
            a = tmp;
            tmp = t;
        }
        return a;
    }

    /** A growable array of doubles. */
    static final class Doubles {
        double[] a = new double[1024];
        int n;

        void add(double v) {
            if (n == a.length) a = java.util.Arrays.copyOf(a, n * 2);
            a[n++] = v;
        }

        double[] trimmed() { return java.util.Arrays.copyOf(a, n); }
    }

    /** The brute-force replay of one recipe: what {@code zbin replay} counts. */
    public static BinTally replay(Recipe r, List<RecordedReading> rows) {
        BinTally t = new BinTally();
        for (RecordedReading row : rows) t.add(Grader.recorded(forReadings(r, row.readings()), row), !row.isCheck());
        return t;
    }

    /**
     * One grading pass over the kept rows: [the sorted deviations graded by value, the process sample (every part
     * whose value was read cleanly)].
     */
    private static double[][] devsAndProcess(Recipe r, List<RecordedReading> rows) {
        Doubles devs = new Doubles(), process = new Doubles();
        for (RecordedReading row : rows) {
            if (row.isCheck()) continue;
            Grading g = Grader.recorded(forReadings(r, row.readings()), row);
            if (byValue(g.reason())) devs.add(g.devPct());
            if (inProcess(g)) process.add(g.devPct());
        }
        double[] d = devs.trimmed();
        Arrays.sort(d);
        return new double[][] {d, process.trimmed()};
    }

    /**
     * Whether a part belongs to the sample the process is estimated from: its value was read cleanly (graded by
     * value, or rejected by a D/Q/ESR/θ gate after its value was known). The same sample on every path, so the
     * same setting has the same risk however it is reached.
     */
    static boolean inProcess(Grading g) {
        return g.verdict() != Verdict.RETEST && (byValue(g.reason()) || g.reason().rejectClass() == Reason.RejectClass.GATE
                && g.reason() != Reason.PHASE_IMPLAUSIBLE) && Double.isFinite(g.devPct());
    }

    static boolean byValue(Reason r) {
        return r == Reason.IN_GRADE || r == Reason.VALUE_LOW || r == Reason.VALUE_HIGH || r == Reason.GUARD_BAND;
    }

    /** Rows graded once: the outcomes that end before the by-value step, and the sorted deviations of the rest. */
    static final class Counted {
        final BinTally fixed = new BinTally();
        private final Recipe base;
        private final Doubles collected = new Doubles(), process = new Doubles();
        /** Parts decided on the mean of several readings (re-measured near a limit): few, graded row by row. */
        private final List<RecordedReading> means = new ArrayList<>();
        double[] devs;

        Counted(Recipe base) { this.base = base; }

        void add(RecordedReading row) {
            Grading g = Grader.recorded(forReadings(base, row.readings()), row);
            if (!row.isCheck() && inProcess(g)) process.add(g.devPct());
            if (!row.isCheck() && byValue(g.reason()) && g.verdict() != Verdict.RETEST) {
                if (row.readings() > 1) means.add(row);
                else collected.add(g.devPct());
            } else fixed.add(g, !row.isCheck());
        }

        void seal() {
            if (devs != null) return;
            devs = collected.trimmed();
            Arrays.sort(devs);
        }

        /** Values x with lo ≤ x ≤ hi (or < / > where not inclusive). */
        long count(double lo, boolean loIn, double hi, boolean hiIn) {
            int a = loIn ? lower(lo) : upper(lo), b = hiIn ? upper(hi) : lower(hi);
            return Math.max(0, b - a);
        }

        /** First index with devs[i] ≥ x. */
        int lower(double x) {
            int lo = 0, hi = devs.length;
            while (lo < hi) {
                int m = (lo + hi) >>> 1;
                if (devs[m] < x) lo = m + 1;
                else hi = m;
            }
            return lo;
        }

        /** First index with devs[i] > x. */
        int upper(double x) {
            int lo = 0, hi = devs.length;
            while (lo < hi) {
                int m = (lo + hi) >>> 1;
                if (devs[m] <= x) lo = m + 1;
                else hi = m;
            }
            return lo;
        }

        /** The setting's bins: the rows that end before the by-value step, and the deviations counted in the rule's bands. */
        BinTally tally(Recipe r) {
            BinTally t = fixed.copy();
            for (ValueBands.Band b : ValueBands.of(r).bands()) {
                Grading.Outcome o = b.outcome();
                t.addFinished(o.bin(), o.grade(), o.verdict(), o.reason(), count(b.lo(), b.loIn(), b.hi(), b.hiIn()));
            }
            for (RecordedReading m : means) t.add(Grader.recorded(forReadings(r, m.readings()), m), true);
            return t;
        }

        private double[][] bins;
        private RiskModel model;

        RiskModel model(double u) {
            if (model == null) model = RiskModel.fromLot(process.a, process.n, u);
            return model;
        }

        double[] risk(Recipe r, double u) {
            if (!(u > 0) || !model(u).estimated()) return noRisk();
            if (bins == null) bins = bin(devs, width(model(u)));
            double[] out = Tuner.risk(r, devs, bins, model(u));
            for (RecordedReading m : means) { // a mean's risk under the uncertainty of a mean of its readings
                int n = m.readings();
                Recipe rn = forReadings(r, n);
                Grading g = Grader.recorded(rn, m);
                if (Double.isFinite(g.devPct())) Tuner.add(rn, g.devPct(), 1, modelFor(u, n), out);
            }
            return out;
        }

        private final java.util.Map<Integer, RiskModel> byN = new java.util.HashMap<>();

        private RiskModel modelFor(double u, int n) {
            return byN.computeIfAbsent(n, k -> RiskModel.fromLot(process.a, process.n, uncertaintyOfMean(base, u, k)));
        }
    }

    /** [false accepts, false rejects] with no value: no uncertainty given, or no process estimate from the lot. */
    private static double[] noRisk() { return new double[] {Double.NaN, Double.NaN}; }

    /** Bin width for the risk sums: a tenth of the posterior σ, and no more than 0.01 %. */
    static double width(RiskModel m) { return Math.min(0.01, m.posteriorSigmaPct() / 10); }

    /** Sorted deviations grouped in bins of {@code w} %: [means, counts, first index]. O(N) once. */
    static double[][] bin(double[] devs, double w) {
        double[] mean = new double[devs.length], count = new double[devs.length], first = new double[devs.length];
        int b = 0, i = 0;
        while (i < devs.length) {
            double start = Math.floor(devs[i] / w) * w;
            int j = i;
            double sum = 0;
            while (j < devs.length && devs[j] < start + w) sum += devs[j++];
            if (j == i) sum += devs[j++]; // rounding at a bin's edge: never an empty bin
            mean[b] = sum / (j - i);
            first[b] = i;
            count[b++] = j - i;
            i = j;
        }
        return new double[][] {java.util.Arrays.copyOf(mean, b), java.util.Arrays.copyOf(count, b), java.util.Arrays.copyOf(first, b)};
    }

    /**
     * A single gate swept (d_max, q_min, esr_max): the lot is graded once without that gate; a row that
     * reached the gates is then failed by the swept gate exactly when its D (or ESR) lies above the setting,
     * and otherwise ends as it did without the gate. With the rows sorted by D or ESR, each setting is a
     * binary search and prefix sums per outcome: O(N log N + K·(log N + outcomes)).
     */
    static final class GateCounted {
        final BinTally fixed = new BinTally();
        final Sweep.Quantity q;
        double[] metric;
        int[][] prefix; // prefix[k][i]: rows among the first i (by metric) whose outcome is key k
        final List<Grading.Outcome> keys = new ArrayList<>();
        double[] faPrefix, frPrefix;
        final RejectBins rb;

        private final Recipe r0;
        private final double u;
        private final Doubles mCol = new Doubles(), kCol = new Doubles(), devCol = new Doubles(), process = new Doubles();
        private boolean sealed;
        RiskModel model;

        GateCounted(Recipe base, Sweep.Quantity q, double u) {
            this.q = q;
            this.u = u;
            this.rb = base.reject();
            Gates g = base.gates();
            Gates without = switch (q) {
                case D_MAX -> new Gates(null, g.qMin(), g.esrMaxOhm(), g.thetaMinDeg(), g.thetaMaxDeg());
                case Q_MIN -> new Gates(g.dMax(), null, g.esrMaxOhm(), g.thetaMinDeg(), g.thetaMaxDeg());
                default -> new Gates(g.dMax(), g.qMin(), null, g.thetaMinDeg(), g.thetaMaxDeg());
            };
            r0 = base.toBuilder().gates(without).build();
        }

        void add(RecordedReading row) {
            Grading gr = Grader.recorded(forReadings(r0, row.readings()), row);
            if (!row.isCheck() && inProcess(gr)) process.add(gr.devPct());
            if (row.isCheck() || !affected(gr.reason(), q)) {
                fixed.add(gr, !row.isCheck());
                return;
            }
            Impedance z = gr.impedance();
            double m = q == Sweep.Quantity.ESR_MAX ? z.esrOhm() : z.d();
            int k = keys.indexOf(gr.outcome());
            if (k < 0) {
                keys.add(gr.outcome());
                k = keys.size() - 1;
            }
            mCol.add(Double.isNaN(m) ? Double.POSITIVE_INFINITY : m);
            kCol.add(k);
            devCol.add(byValue(gr.reason()) ? gr.devPct() : Double.NaN);
        }

        void seal() {
            if (sealed) return;
            sealed = true;
            int n = mCol.n;
            double[] mm = mCol.a;
            int[] order = order(mm, n);
            metric = new double[n];
            prefix = new int[keys.size()][n + 1];
            faPrefix = new double[n + 1];
            frPrefix = new double[n + 1];
            double[] fa = new double[n], fr = new double[n];
            if (u > 0) model = RiskModel.fromLot(process.a, process.n, u);
            if (u > 0 && model.estimated()) {
                // The process is the lot's as the recipe without the swept gate grades it; each row's risk is that of
                // its own reading under that prior.
                double[][] one = new double[2][1];
                for (int i = 0; i < n; i++) {
                    if (Double.isNaN(devCol.a[i])) continue;
                    one[0][0] = devCol.a[i];
                    one[1][0] = 1;
                    double[] rk = Tuner.risk(r0, one[0], new double[][] {one[0], one[1], {0}}, model);
                    fa[i] = rk[0];
                    fr[i] = rk[1];
                }
            }
            for (int j = 0; j < n; j++) {
                int i = order[j];
                metric[j] = mm[i];
                for (int k = 0; k < keys.size(); k++) prefix[k][j + 1] = prefix[k][j] + ((int) kCol.a[i] == k ? 1 : 0);
                faPrefix[j + 1] = faPrefix[j] + fa[i];
                frPrefix[j + 1] = frPrefix[j] + fr[i];
            }
        }

        /** Whether a row with this outcome (without the swept gate) meets the swept gate at all. */
        private static boolean affected(Reason r, Sweep.Quantity q) {
            if (byValue(r) || r == Reason.THETA_OUT || r == Reason.ESR_HIGH) return q != Sweep.Quantity.ESR_MAX || r != Reason.ESR_HIGH;
            if (r == Reason.Q_LOW) return q == Sweep.Quantity.D_MAX;
            return false;
        }

        /** Rows whose metric passes the setting: metric ≤ threshold, the gate's own comparison. */
        private int passing(double v) {
            double t = q == Sweep.Quantity.Q_MIN ? Gates.dOfQ(v) : v;
            int lo = 0, hi = metric.length;
            while (lo < hi) {
                int m = (lo + hi) >>> 1;
                if (Gates.passes(metric[m], t)) lo = m + 1;
                else hi = m;
            }
            return lo;
        }

        BinTally tally(Recipe r, double v) {
            BinTally t = fixed.copy();
            int p = passing(v);
            for (int k = 0; k < keys.size(); k++) {
                Grading.Outcome o = keys.get(k);
                t.addFinished(o.bin(), o.grade(), o.verdict(), o.reason(), prefix[k][p]);
            }
            Reason fail = q == Sweep.Quantity.D_MAX ? Reason.D_HIGH : q == Sweep.Quantity.Q_MIN ? Reason.Q_LOW : Reason.ESR_HIGH;
            t.addFinished(r.reject().gate(), "gate", Verdict.FAIL, fail, metric.length - p);
            return t;
        }

        double[] risk(double v) {
            if (!(u > 0) || !model.estimated()) return noRisk();
            int p = passing(v);
            return new double[] {faPrefix[p], frPrefix[p]};
        }
    }

    /** [expected false accepts, expected false rejects] over sorted deviations, under the process of the lot's sample. */
    static double[] risk(Recipe r, double[][] devsAndProcess, double u) {
        if (!(u > 0)) return noRisk();
        double[] devs = devsAndProcess[0], process = devsAndProcess[1];
        RiskModel m = RiskModel.fromLot(process, process.length, u);
        if (!m.estimated()) return noRisk();
        return risk(r, devs, bin(devs, width(m)), m);
    }

    /**
     * The same over pre-grouped bins [means, counts, first index] of the sorted deviations: O(B). A bin whose first
     * and last deviation are accepted differently (an acceptance limit runs through it) is summed row by row, so
     * the figure is the row-by-row sum up to the posterior's curvature within a bin, on every path alike.
     */
    static double[] risk(Recipe r, double[] devs, double[][] bins, RiskModel m) {
        if (!m.estimated()) return noRisk();
        if (bins[0].length == 0) return new double[] {0, 0};
        double[] out = new double[2];
        for (int b = 0; b < bins[0].length; b++) {
            int first = (int) bins[2][b], n = (int) bins[1][b];
            if (n > 1 && accepting(r, devs[first]) != accepting(r, devs[first + n - 1]))
                for (int i = first; i < first + n; i++) add(r, devs[i], 1, m, out);
            else add(r, bins[0][b], n, m, out);
        }
        return out;
    }

    private static void add(Recipe r, double x, double c, RiskModel m, double[] out) {
        Grade g = accepting(r, x);
        if (g != null) out[0] += c * m.outside(x, g.lowPct(), g.highPct());
        else {
            List<Grade> gs = r.grades();
            double specLo = r.mode() == GradingMode.CONCENTRIC ? gs.get(gs.size() - 1).lowPct() : gs.get(0).lowPct();
            out[1] += c * m.inside(x, specLo, gs.get(gs.size() - 1).highPct());
        }
    }

    /** The grade that accepts a deviation by the recipe's rule, or null when it is not accepted. */
    private static Grade accepting(Recipe r, double x) {
        Grading.Outcome o = Grader.byValue(r, x);
        if (o.verdict() != Verdict.PASS) return null;
        for (Grade g : r.grades()) if (g.name().equals(o.grade())) return g;
        throw new IllegalStateException("no grade " + o.grade() + " in recipe " + r.name());
    }

    /** The recipe as it judges the mean of n readings: the guard band of that mean. */
    static Recipe forReadings(Recipe r, int n) {
        return n <= 1 || r.guard().repeatabilityPct() == 0 ? r : r.toBuilder().guard(r.guard().forReadings(n)).build();
    }

    /** U of the mean of n readings when one reading has U {@code u}: the recipe's repeatability part shrinks by √n. */
    static double uncertaintyOfMean(Recipe r, double u, int n) {
        double ur = Math.min(u, r.guard().repeatabilityPct());
        return Math.sqrt(Math.max(0, u * u - ur * ur) + ur * ur / n);
    }
}
