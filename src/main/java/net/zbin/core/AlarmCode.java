package net.zbin.core;

import java.util.Locale;

/** Every alarm the line raises, with its wire code and severity. The README's alarm table lists them. */
public enum AlarmCode {
    RECORD_LOG_FAILED(Severity.CRITICAL, false),
    METER_LINK_DOWN(Severity.CRITICAL, false),
    METER_SETUP_REFUSED(Severity.CRITICAL, false),
    VALUE_DRIFT(Severity.WARNING, true),
    LOSS_DRIFT(Severity.WARNING, true),
    COMPENSATION_OFFSET(Severity.CRITICAL, true),
    OPEN_RESIDUAL(Severity.WARNING, true),
    SHORT_RESIDUAL(Severity.WARNING, true),
    REFERENCE_OFF(Severity.CRITICAL, true),
    COMPENSATION_OLD(Severity.WARNING, true),
    COMPENSATION_MISSING(Severity.CRITICAL, true),
    NEGATIVE_R_RATE(Severity.WARNING, true);

    public enum Severity {
        WARNING, CRITICAL;

        private final String key = name().toLowerCase(Locale.ROOT); // once: keys are written per decision

        public String key() { return key; }
    }

    private final Severity severity;
    private final boolean recipeBound;

    AlarmCode(Severity severity, boolean recipeBound) {
        this.severity = severity;
        this.recipeBound = recipeBound;
    }

    /** Raised by the line monitor about the active recipe's parts and compensation: re-judged when the recipe changes. */
    public boolean recipeBound() { return recipeBound; }

    private final String code = name().toLowerCase(Locale.ROOT).replace('_', '-');

    public String code() { return code; }

    public Severity severity() { return severity; }

    public static AlarmCode parse(String code) {
        for (AlarmCode a : values()) if (a.code().equals(code)) return a;
        throw new IllegalArgumentException("unknown alarm code '" + code + "'");
    }

    /** A change of an alarm: raised (with the figure that tripped it) or cleared. */
    public record Change(AlarmCode code, boolean active, String message) {}
}
