package net.zbin.core;

import java.util.Locale;

/** Every alarm the line raises, with its wire code and severity. The README's alarm table lists them. */
public enum AlarmCode {
    RECORD_LOG_FAILED(Severity.CRITICAL),
    METER_LINK_DOWN(Severity.CRITICAL),
    METER_SETUP_REFUSED(Severity.CRITICAL),
    VALUE_DRIFT(Severity.WARNING),
    LOSS_DRIFT(Severity.WARNING),
    COMPENSATION_OFFSET(Severity.CRITICAL),
    OPEN_RESIDUAL(Severity.WARNING),
    SHORT_RESIDUAL(Severity.WARNING),
    REFERENCE_OFF(Severity.CRITICAL),
    COMPENSATION_OLD(Severity.WARNING),
    COMPENSATION_MISSING(Severity.CRITICAL),
    NEGATIVE_R_RATE(Severity.WARNING);

    public enum Severity {
        WARNING, CRITICAL;

        public String key() { return name().toLowerCase(Locale.ROOT); }
    }

    private final Severity severity;

    AlarmCode(Severity severity) { this.severity = severity; }

    public String code() { return name().toLowerCase(Locale.ROOT).replace('_', '-'); }

    public Severity severity() { return severity; }

    public static AlarmCode parse(String code) {
        for (AlarmCode a : values()) if (a.code().equals(code)) return a;
        throw new IllegalArgumentException("unknown alarm code '" + code + "'");
    }

    /** A change of an alarm: raised (with the figure that tripped it) or cleared. */
    public record Change(AlarmCode code, boolean active, String message) {}
}
