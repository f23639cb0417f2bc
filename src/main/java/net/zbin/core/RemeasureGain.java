package net.zbin.core;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

/**
 * What re-measuring near a limit would gain on a lot: false rejects and false accepts per 100 parts when a part
 * is read up to 1, 2, … n times. The lot's process comes from its own readings ({@link RiskModel#fromLot}); each
 * simulated part has a true deviation from that process, a systematic error and, per reading, a repeatability error
 * (the recipe's split of U); it is read, re-read while {@link PartSession#near} says so, and decided on the mean by
 * {@link Grader#byValue} under the guard of that mean — the engine's own rules. False reject: the true value is
 * within the plan's limits and the part is not accepted; false accept: accepted into a grade whose limits the true
 * value is outside (as {@code tune}'s risk figures count them).
 *
 * @param maxReadings     readings of one part at most
 * @param falseRejectPct  expected false rejects, % of parts
 * @param falseAcceptPct  expected false accepts, % of parts
 * @param downgradedPct   parts accepted into a looser grade than their true value earns (concentric plans: a J part
 *                        sold as K), or not accepted though within the limits of a grade, %
 * @param remeasuredPct   parts read more than once, %
 * @param meanReadings    readings per part on average (the time it costs)
 */
public record RemeasureGain(int maxReadings, double falseRejectPct, double falseAcceptPct, double downgradedPct, double remeasuredPct,
                            double meanReadings) {
    /** Simulated parts per setting: the figures' Monte Carlo error is then about 0.02 % of parts at 1 % rates. */
    public static final int PARTS = 200_000;

    /**
     * @param r              the recipe; its {@code remeasure.near_pct} when on, else U
     * @param process        the lot's process (mean and σ of the true deviations, %)
     * @param uncertaintyPct U (k = 2) of one reading, %; its repeatability part is the recipe's (at most U)
     * @param upTo           the largest number of readings to estimate
     */
    public static List<RemeasureGain> estimate(Recipe r, RiskModel process, double uncertaintyPct, int upTo, long seed) {
        if (upTo < 1 || upTo > 16) throw new IllegalArgumentException("readings must be 1..16 (was " + upTo + ")");
        if (!process.estimated()) throw new IllegalArgumentException("process: " + process.describe());
        double ur = Math.min(uncertaintyPct, r.guard().repeatabilityPct());
        double sigmaR = ur / 2, sigmaS = Math.sqrt(Math.max(0, uncertaintyPct * uncertaintyPct - ur * ur)) / 2;
        double near = r.remeasure().on() ? r.remeasure().nearPct() : uncertaintyPct;
        List<Grade> gs = r.grades();
        double specLo = r.mode() == GradingMode.CONCENTRIC ? gs.get(gs.size() - 1).lowPct() : gs.get(0).lowPct();
        double specHi = gs.get(gs.size() - 1).highPct();
        List<RemeasureGain> out = new ArrayList<>();
        for (int max = 1; max <= upTo; max++) {
            Recipe base = r.toBuilder().remeasure(max == 1 ? Remeasure.OFF : new Remeasure(max, near)).build();
            Recipe[] plan = PartSession.plan(base);
            SplittableRandom rnd = new SplittableRandom(seed); // the same parts for every setting: differences are the rule's
            long fr = 0, fa = 0, down = 0, again = 0, readings = 0;
            for (int p = 0; p < PARTS; p++) {
                SplittableRandom part = rnd.split(); // one stream per part: a re-read does not shift the parts after it
                double t = process.processMeanPct() + process.processSigmaPct() * gauss(part);
                double y = t + sigmaS * gauss(part);
                double sum = y + sigmaR * gauss(part);
                int n = 1;
                while (n < max && PartSession.near(plan[n - 1], sum / n)) {
                    sum += y + sigmaR * gauss(part);
                    n++;
                }
                readings += n;
                if (n > 1) again++;
                Grading.Outcome o = Grader.byValue(plan[n - 1], sum / n);
                int earned = earned(r, t);
                if (o.verdict() == Verdict.PASS) {
                    Grade g = grade(r, o.grade());
                    if (t < g.lowPct() || t > g.highPct()) fa++;
                    else if (r.mode() == GradingMode.CONCENTRIC && gs.indexOf(g) > earned) down++;
                } else {
                    if (t >= specLo && t <= specHi) fr++;
                    if (earned >= 0) down++;
                }
            }
            out.add(new RemeasureGain(max, 100.0 * fr / PARTS, 100.0 * fa / PARTS, 100.0 * down / PARTS, 100.0 * again / PARTS,
                    (double) readings / PARTS));
        }
        return out;
    }

    /** The index of the first grade (the tightest, in a concentric plan) whose limits hold a true deviation, or −1. */
    private static int earned(Recipe r, double t) {
        List<Grade> gs = r.grades();
        for (int i = 0; i < gs.size(); i++) if (t >= gs.get(i).lowPct() && t <= gs.get(i).highPct()) return i;
        return -1;
    }

    private static Grade grade(Recipe r, String name) {
        for (Grade g : r.grades()) if (g.name().equals(name)) return g;
        throw new IllegalStateException("no grade " + name + " in recipe " + r.name());
    }

    /** A standard normal variate (Marsaglia's polar method). */
    private static double gauss(SplittableRandom rnd) {
        double u, v, s;
        do {
            u = 2 * rnd.nextDouble() - 1;
            v = 2 * rnd.nextDouble() - 1;
            s = u * u + v * v;
        } while (s >= 1 || s == 0);
        return u * Math.sqrt(-2 * Math.log(s) / s);
    }
}
