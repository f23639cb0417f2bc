package net.zbin.core;

import java.util.Locale;

/**
 * Why a decision came out as it did: one constant per reason code, carrying its wire name, what kind of
 * outcome it is and, for rejects, which reject bin takes the part. A new reason is one constant here
 * (and a line in the README's table, which a test checks against this list).
 */
public enum Reason {
    IN_GRADE(Kind.GRADED, null),
    VALUE_LOW(Kind.REJECTED, RejectClass.LOW),
    VALUE_HIGH(Kind.REJECTED, RejectClass.HIGH),
    GUARD_BAND(Kind.REJECTED, RejectClass.GUARD),
    WRONG_SIGN(Kind.REJECTED, RejectClass.LOW),
    PHASE_IMPLAUSIBLE(Kind.REJECTED, RejectClass.GATE),
    D_HIGH(Kind.REJECTED, RejectClass.GATE),
    Q_LOW(Kind.REJECTED, RejectClass.GATE),
    ESR_HIGH(Kind.REJECTED, RejectClass.GATE),
    THETA_OUT(Kind.REJECTED, RejectClass.GATE),
    OPEN_CONTACT(Kind.UNCLEAN, RejectClass.CONTACT),
    SHORT(Kind.UNCLEAN, RejectClass.SHORT),
    NEGATIVE_R(Kind.UNCLEAN, RejectClass.FAULT),
    OVERLOAD(Kind.UNCLEAN, RejectClass.OVERLOAD),
    NON_FINITE(Kind.UNCLEAN, RejectClass.FAULT),
    FREQUENCY_MISMATCH(Kind.UNCLEAN, RejectClass.FAULT),
    NO_COMPENSATION(Kind.UNCLEAN, RejectClass.FAULT),
    COMPENSATION_MISMATCH(Kind.UNCLEAN, RejectClass.FAULT),
    METER_TIMEOUT(Kind.UNCLEAN, RejectClass.FAULT),
    METER_GARBLED(Kind.UNCLEAN, RejectClass.FAULT),
    METER_DISCONNECTED(Kind.UNCLEAN, RejectClass.FAULT),
    METER_ERROR(Kind.UNCLEAN, RejectClass.FAULT),
    SETUP_REFUSED(Kind.UNCLEAN, RejectClass.FAULT),
    LINE_PAUSED(Kind.NOT_MEASURED, null),
    LINE_FAULT(Kind.NOT_MEASURED, null),
    LINE_BUSY(Kind.NOT_MEASURED, null),
    STALE_TRIGGER(Kind.NOT_MEASURED, null),
    RECORD_FAILED(Kind.NOT_MEASURED, null),
    STEP_NOT_MEASURED(Kind.NOT_MEASURED, null),
    FIXTURE_OK(Kind.CHECK, null),
    FIXTURE_DRIFT(Kind.CHECK, null),
    REFERENCE_OK(Kind.CHECK, null),
    REFERENCE_OFF(Kind.CHECK, null);

    /**
     * GRADED: a value grade (pass). REJECTED: measured cleanly and failed (fail). UNCLEAN: no clean
     * reading (retest up to the recipe's count, then its reject bin). NOT_MEASURED: the part was not
     * measured for a reason outside it (retest, not counted against the limit). CHECK: the answer to an
     * open, short or reference presentation.
     */
    public enum Kind { GRADED, REJECTED, UNCLEAN, NOT_MEASURED, CHECK }

    /** Which reject bin of a recipe takes the part. */
    public enum RejectClass {
        LOW, HIGH, GATE, CONTACT, SHORT, OVERLOAD, FAULT, GUARD;

        private final String key = name().toLowerCase(Locale.ROOT); // once: keys are written per decision

        public String key() { return key; }
    }

    private final String code;
    private final Kind kind;
    private final RejectClass rejectClass;

    Reason(Kind kind, RejectClass rejectClass) {
        this.code = name().toLowerCase(Locale.ROOT).replace('_', '-');
        this.kind = kind;
        this.rejectClass = rejectClass;
    }

    /** The kebab-case code on the wire and in the record log. */
    public String code() { return code; }

    public Kind kind() { return kind; }

    /** The reject bin class, or null for grades, checks and parts not measured. */
    public RejectClass rejectClass() { return rejectClass; }

    /** @throws IllegalArgumentException for a code that is not one of ours */
    public static Reason parse(String code) {
        for (Reason r : values()) if (r.code.equals(code)) return r;
        throw new IllegalArgumentException("unknown reason code '" + code + "'");
    }

    @Override
    public String toString() { return code; }
}
