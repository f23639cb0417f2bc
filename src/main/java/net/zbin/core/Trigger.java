package net.zbin.core;

import java.util.Locale;

/**
 * A handler's request to decide one presentation.
 *
 * @param seq      idempotency key, ≥ 0: the same seq is never measured twice
 * @param part     part id, may be empty
 * @param lot      lot id, may be empty (the line's current lot is used)
 * @param kind     what is on the contacts
 * @param retestOf seq of the presentation this one retests, or −1
 */
public record Trigger(long seq, String part, String lot, Kind kind, long retestOf) {
    /** What the handler put on the contacts. */
    public enum Kind {
        PART, OPEN, SHORT, REFERENCE;

        private static final Kind[] ALL = values();
        /** Made once: every trigger and record row reads it and every decision writes it. */
        private final String key = name().toLowerCase(Locale.ROOT);

        public String key() { return key; }

        public static Kind parse(String s) {
            for (Kind k : ALL) if (k.key.equals(s)) return k;
            throw new IllegalArgumentException("kind must be part, open, short or reference (was '" + s + "')");
        }
    }

    public Trigger {
        if (seq < 0) throw new IllegalArgumentException("seq must be >= 0 (was " + seq + ")");
        if (retestOf < -1) throw new IllegalArgumentException("retest_of must be >= 0 (was " + retestOf + ")");
        if (retestOf == seq) throw new IllegalArgumentException("retest_of must name an earlier seq, not this one");
        if (part == null) part = "";
        if (lot == null) lot = "";
        if (kind == null) kind = Kind.PART;
    }
}
