package net.zbin.app.report;

import java.util.ArrayList;
import java.util.List;
import net.zbin.core.AlarmCode;
import net.zbin.core.Gates;
import net.zbin.core.Grade;
import net.zbin.core.GradingMode;
import net.zbin.core.Grading;
import net.zbin.core.PartType;
import net.zbin.core.Recipe;
import net.zbin.core.Verdict;

/**
 * What the report draws of a lot, gathered row by row in bounded memory: a histogram of the graded
 * deviation over the recipe's limits (and beyond), a histogram of the loss (D, or ESR) up to twice its
 * gate, a run chart of the deviation (decimated to at most {@value #RUN_POINTS} points, every k-th row,
 * k doubling as the lot grows) and the alarm points.
 */
public final class LotPlots {
    static final int BINS = 120, RUN_POINTS = 4000;

    final Recipe recipe;
    final double devLo, devHi, lossHi;
    final long[] devCounts = new long[BINS], lossCounts = new long[BINS];
    long devUnder, devOver, lossOver;
    final List<double[]> run = new ArrayList<>();
    int stride = 1;
    long seen;
    final List<Object[]> alarms = new ArrayList<>();

    public LotPlots(Recipe r) {
        recipe = r;
        List<Grade> gs = r.grades();
        double lo = r.mode() == GradingMode.CONCENTRIC ? gs.get(gs.size() - 1).lowPct() : gs.get(0).lowPct();
        double hi = gs.get(gs.size() - 1).highPct();
        double span = hi - lo;
        devLo = lo - span * 0.25;
        devHi = hi + span * 0.25;
        Gates g = r.gates();
        double lim = r.partType() == PartType.CAPACITOR ? (g.dMax() != null ? g.dMax() : g.qMin() != null ? 1 / g.qMin() : 0.05)
                : (g.esrMaxOhm() != null ? g.esrMaxOhm() : r.idealZOhm() * 0.1);
        lossHi = 2 * lim;
    }

    /** The quantity the loss histogram shows. */
    public String lossName() { return recipe.partType() == PartType.CAPACITOR ? "D" : "ESR (Ω)"; }

    double lossLimit() {
        Gates g = recipe.gates();
        if (recipe.partType() == PartType.CAPACITOR) return g.dMax() != null ? g.dMax() : g.qMin() != null ? 1 / g.qMin() : Double.NaN;
        return g.esrMaxOhm() != null ? g.esrMaxOhm() : Double.NaN;
    }

    /** One graded part presentation (checks and retests are not drawn). */
    public void add(Grading g) {
        if (g.graded() == null || g.verdict() == Verdict.RETEST || !Double.isFinite(g.devPct())) return;
        double dev = g.devPct();
        if (dev < devLo) devUnder++;
        else if (dev >= devHi) devOver++;
        else devCounts[(int) ((dev - devLo) / (devHi - devLo) * BINS)]++;
        double loss = recipe.partType() == PartType.CAPACITOR ? g.d() : g.esrOhm();
        if (Double.isFinite(loss) && loss >= 0) {
            if (loss >= lossHi) lossOver++;
            else lossCounts[(int) (loss / lossHi * BINS)]++;
        }
        if (seen++ % stride == 0) {
            run.add(new double[] {seen, dev});
            if (run.size() >= RUN_POINTS) {
                List<double[]> half = new ArrayList<>();
                for (int i = 0; i < run.size(); i += 2) half.add(run.get(i));
                run.clear();
                run.addAll(half);
                stride *= 2;
            }
        }
    }

    /** An alarm raised or cleared after the {@code seen}-th graded part. */
    public void alarm(AlarmCode.Change c) { alarms.add(new Object[] {seen, c}); }
}
