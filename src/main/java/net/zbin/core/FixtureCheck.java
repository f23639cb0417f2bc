package net.zbin.core;

/**
 * Grading of the handler's check presentations: an empty fixture (open), the short bar, or the
 * reference part. They are compared with the stored compensation or the recipe; the answer's bin
 * is the retest bin (there is no part to sort) and its verdict says whether the check passed.
 */
public final class FixtureCheck {
    private FixtureCheck() {}

    /**
     * @param openDriftMaxF    largest accepted change of stray capacitance since the open was captured, in F
     * @param shortDriftMaxOhm largest accepted change of the short's impedance since it was captured, in Ω
     */
    public record Limits(double openDriftMaxF, double shortDriftMaxOhm) {
        public static final Limits DEFAULT = new Limits(0.5e-12, 0.05);

        public Limits {
            if (!(openDriftMaxF > 0)) throw new SpecException("fixture.open_check_f", "must be > 0 (was " + openDriftMaxF + ")");
            if (!(shortDriftMaxOhm > 0)) throw new SpecException("fixture.short_check_ohm", "must be > 0 (was " + shortDriftMaxOhm + ")");
        }
    }

    public static Grading open(Recipe r, Reading rd, Compensation comp, Limits lim) {
        if (!rd.isFinite()) return result(r, rd, "open-check", Verdict.FAIL, "non-finite", CompensationSource.NONE);
        if (comp == null || comp.open() == null) return result(r, rd, "open-check", Verdict.FAIL, "no-compensation", CompensationSource.NONE);
        Impedance now = new Impedance(rd.freqHz(), rd.rOhm(), rd.xOhm());
        double delta = now.cpF() - comp.open().cpF();
        boolean ok = Math.abs(delta) <= lim.openDriftMaxF();
        return result(r, rd, "open-check", ok ? Verdict.PASS : Verdict.FAIL, ok ? "fixture-ok" : "fixture-drift", comp.source());
    }

    public static Grading shortBar(Recipe r, Reading rd, Compensation comp, Limits lim) {
        if (!rd.isFinite()) return result(r, rd, "short-check", Verdict.FAIL, "non-finite", CompensationSource.NONE);
        if (comp == null || comp.shortZ() == null) return result(r, rd, "short-check", Verdict.FAIL, "no-compensation", CompensationSource.NONE);
        double delta = Math.hypot(rd.rOhm() - comp.shortZ().rOhm(), rd.xOhm() - comp.shortZ().xOhm());
        boolean ok = delta <= lim.shortDriftMaxOhm();
        return result(r, rd, "short-check", ok ? Verdict.PASS : Verdict.FAIL, ok ? "fixture-ok" : "fixture-drift", comp.source());
    }

    /** The reference part: graded as a part; it passes when it lands in the recipe's first grade. */
    public static Grading reference(Recipe r, Reading rd, Compensation comp, int attempt) {
        Grading g = Grader.grade(r, rd, comp, attempt);
        boolean ok = g.verdict() == Verdict.PASS && g.grade().equals(r.grades().get(0).name());
        return new Grading(r.retest().bin(), "reference", ok ? Verdict.PASS : Verdict.FAIL, ok ? "reference-ok" : "reference-off",
                g.model(), g.param(), g.value(), g.devPct(), g.freqHz(), g.rOhm(), g.xOhm(), g.rawROhm(), g.rawXOhm(), g.comp());
    }

    private static Grading result(Recipe r, Reading rd, String grade, Verdict v, String reason, CompensationSource src) {
        return new Grading(r.retest().bin(), grade, v, reason, null, null, Double.NaN, Double.NaN, rd.freqHz(),
                rd.rOhm(), rd.xOhm(), rd.rOhm(), rd.xOhm(), src);
    }
}
