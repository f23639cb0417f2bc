package net.zbin.core;

/**
 * Grading of the handler's check presentations: an empty fixture (open), the short bar, or the
 * reference part. They are compared with the stored compensation or the recipe; the answer's bin
 * is the retest bin (there is no part to sort) and its verdict says whether the check passed. An open
 * or short check carries, as its compensated R/X, the residual beyond the stored open (1/(Y − Yopen):
 * its Cp is the stray that appeared) or short (Z − Zshort), so the record log keeps the trend.
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
            Plausible.atMost("fixture.open_check_f", openDriftMaxF, 1e-9, "F", "a fixture's stray drifts by fractions of a pF", 1e-12, "picofarads");
            Plausible.atMost("fixture.short_check_ohm", shortDriftMaxOhm, 10, "Ω", "a short bar's residual drifts by milliohms", 1e-3, "milliohms");
        }
    }

    public static Grading open(Recipe r, Reading rd, Compensation comp, Limits lim) {
        if (!rd.isFinite()) return result(r, rd, null, "open-check", Verdict.FAIL, Reason.NON_FINITE, CompensationSource.NONE);
        if (comp == null || comp.open() == null) return result(r, rd, null, "open-check", Verdict.FAIL, Reason.NO_COMPENSATION, CompensationSource.NONE);
        Impedance now = new Impedance(rd.freqHz(), rd.rOhm(), rd.xOhm());
        // The residual admittance beyond the stored open, kept as the check's compensated R/X: 1 / (Ynow − Yopen).
        Cplx yres = new Cplx(now.rOhm(), now.xOhm()).reciprocal().sub(new Cplx(comp.open().rOhm(), comp.open().xOhm()).reciprocal());
        Cplx zres = yres.re() == 0 && yres.im() == 0 ? new Cplx(1e305, 0) : yres.reciprocal();
        Impedance residual = new Impedance(rd.freqHz(), zres.re(), zres.im());
        boolean ok = Math.abs(yres.im() / now.omega()) <= lim.openDriftMaxF();
        return result(r, rd, residual, "open-check", ok ? Verdict.PASS : Verdict.FAIL, ok ? Reason.FIXTURE_OK : Reason.FIXTURE_DRIFT, comp.source());
    }

    public static Grading shortBar(Recipe r, Reading rd, Compensation comp, Limits lim) {
        if (!rd.isFinite()) return result(r, rd, null, "short-check", Verdict.FAIL, Reason.NON_FINITE, CompensationSource.NONE);
        if (comp == null || comp.shortZ() == null) return result(r, rd, null, "short-check", Verdict.FAIL, Reason.NO_COMPENSATION, CompensationSource.NONE);
        // The residual beyond the stored short, kept as the check's compensated R/X: Znow − Zshort.
        Impedance residual = new Impedance(rd.freqHz(), rd.rOhm() - comp.shortZ().rOhm(), rd.xOhm() - comp.shortZ().xOhm());
        boolean ok = residual.zOhm() <= lim.shortDriftMaxOhm();
        return result(r, rd, residual, "short-check", ok ? Verdict.PASS : Verdict.FAIL, ok ? Reason.FIXTURE_OK : Reason.FIXTURE_DRIFT, comp.source());
    }

    /** The reference part: graded as a part; it passes when it lands in the recipe's first grade. */
    public static Grading reference(Recipe r, Reading rd, Compensation comp, int attempt) {
        Grading g = Grader.grade(r, rd, comp, attempt);
        boolean ok = g.verdict() == Verdict.PASS && g.grade().equals(r.grades().get(0).name());
        return new Grading(new Grading.Outcome(r.retest().bin(), "reference", ok ? Verdict.PASS : Verdict.FAIL,
                ok ? Reason.REFERENCE_OK : Reason.REFERENCE_OFF), g.measured(), g.graded());
    }

    /** The raw reading as measured, and as "compensated" R/X the residual beyond the stored fixture (null without one). */
    private static Grading result(Recipe r, Reading rd, Impedance residual, String grade, Verdict v, Reason reason, CompensationSource src) {
        return new Grading(new Grading.Outcome(r.retest().bin(), grade, v, reason), Grading.Measurement.of(rd, residual, src), null);
    }
}
