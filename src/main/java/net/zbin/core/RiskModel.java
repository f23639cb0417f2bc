package net.zbin.core;

/**
 * The measurement-and-process model behind {@code tune}'s risk figures: the global consumer's and producer's
 * risk of JCGM 106:2012 §9.5 (false accept, false reject), estimated from the lot itself.
 *
 * <p>Model (JCGM 106:2012 §9.5.2, normal–normal): a part's true deviation t (in % of nominal) is drawn from
 * the process N(μp, σp²); the measured deviation is x = t + e with e ~ N(0, u²), u = U/2, independent of t
 * and from part to part. The lot's measured deviations then have mean μp and variance s² = σp² + u², so the
 * process is estimated by μp = mean(x) and σp² = s² − u² (floored at a tiny fraction of s² when the
 * measurement accounts for the whole spread). Given a reading x the true deviation is normal with mean
 * μp + ρ(x − μp) and variance ρu², ρ = σp²/(σp² + u²) (the posterior under that prior). Summing over the lot's
 * parts the posterior probability that an accepted part's true value lies outside its grade gives the expected
 * false accepts — the lot's own estimate of the global consumer's risk — and the probability that a part
 * rejected on its value lies inside the widest limits gives the expected false rejects (producer's risk).
 *
 * <p>Assumptions (stated in the README): the process is normal over the lot (a pre-sorted or bimodal lot is
 * not), u is the same for every part (U in % of the nominal), readings are unbiased, and only the value is
 * uncertain (D, Q, ESR are taken as read).
 *
 * <p>A lot with fewer than {@link #LEAST_PARTS} parts graded by value has no spread to estimate: its model is not
 * {@link #estimated()}, μp and σp are NaN, and every risk figure under it has no value (rather than one computed from
 * an invented process).
 *
 * @param processMeanPct  μp, % of nominal
 * @param processSigmaPct σp, % of nominal
 * @param uPct            the standard uncertainty u = U/2, % of nominal
 * @param resolved        false when the lot's spread is no wider than the measurement's (σp floored)
 * @param parts           the lot's parts graded by value the process was estimated from
 */
public record RiskModel(double processMeanPct, double processSigmaPct, double uPct, boolean resolved, int parts) {
    /** Fewest parts graded by value that give a process estimate: a mean and a spread. */
    public static final int LEAST_PARTS = 2;

    public RiskModel {
        if (parts < 0) throw new IllegalArgumentException("parts: " + parts + " is below 0");
    }

    /** Whether the lot had parts enough for a process estimate; without one, no risk figure has a value. */
    public boolean estimated() { return parts >= LEAST_PARTS; }

    /** The posterior's weight on the reading, ρ = σp²/(σp² + u²). */
    public double rho() { return processSigmaPct * processSigmaPct / (processSigmaPct * processSigmaPct + uPct * uPct); }

    /** σ of the true deviation given a reading. */
    public double posteriorSigmaPct() { return Math.sqrt(rho()) * uPct; }

    /** Mean of the true deviation given a reading x. */
    public double posteriorMeanPct(double x) { return processMeanPct + rho() * (x - processMeanPct); }

    /** Probability that the true deviation of a part read at x lies outside [lo, hi]. */
    public double outside(double x, double lo, double hi) {
        double m = posteriorMeanPct(x), s = posteriorSigmaPct();
        return RunLength.phi((lo - m) / s) + RunLength.phi((m - hi) / s);
    }

    /** Probability that the true deviation of a part read at x lies inside [lo, hi]. */
    public double inside(double x, double lo, double hi) {
        double m = posteriorMeanPct(x), s = posteriorSigmaPct();
        return Math.max(0, RunLength.phi((hi - m) / s) - RunLength.phi((lo - m) / s));
    }

    /**
     * The model for a lot's measured deviations.
     *
     * @param uncertaintyPct the expanded uncertainty U (k = 2), % of nominal
     */
    public static RiskModel fromLot(double[] devs, int n, double uncertaintyPct) {
        RunningStats st = new RunningStats();
        for (int i = 0; i < n; i++) st.add(devs[i]);
        double u = uncertaintyPct / 2;
        int parts = (int) st.count();
        if (parts < LEAST_PARTS) return new RiskModel(Double.NaN, Double.NaN, u, false, parts);
        double s2 = st.variance(), p2 = s2 - u * u;
        boolean resolved = p2 > 1e-6 * s2;
        return new RiskModel(st.mean(), Math.sqrt(resolved ? p2 : 1e-6 * s2 + 1e-300), u, resolved, parts);
    }

    /** One line for people. */
    public String describe() {
        if (!estimated()) return String.format(java.util.Locale.ROOT, "no process estimate: the lot has %d part%s graded by value, and a mean"
                + " and a spread need %d at least", parts, parts == 1 ? "" : "s", LEAST_PARTS);
        return String.format(java.util.Locale.ROOT, "process N(%+.4g %%, σ %.4g %%) from the lot's %d parts graded by value (σ of the readings"
                + " minus u = %.4g %%)%s", processMeanPct, processSigmaPct, parts, uPct, resolved ? ""
                : "; the lot's spread is no wider than the measurement's: risks are those of a process at its mean");
    }
}
