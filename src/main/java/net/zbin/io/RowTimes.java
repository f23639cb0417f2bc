package net.zbin.io;

import java.time.Instant;

/**
 * Reads the record log's {@code time} column (an ISO-8601 instant in UTC, as {@link Instant#toString} writes it) row
 * after row. Rows of the same second share everything up to the seconds, so that part is parsed by
 * {@link Instant#parse} once per second and only the fraction after it is read for the other rows of that second;
 * anything not of that exact shape goes to {@link Instant#parse} whole. The result is always the instant
 * {@link Instant#parse} gives. One instance per file read: it keeps the last second seen.
 */
final class RowTimes {
    /** "2026-12-03T05:59:01": the part up to the seconds. */
    private static final int SECONDS_END = 19;
    private String second;
    private long epochSecond;

    Instant parse(String s) {
        int n = s.length();
        int digits = n - SECONDS_END - 2; // between the '.' and the 'Z'
        if (second != null && digits >= 1 && digits <= 9 && s.charAt(SECONDS_END) == '.' && s.charAt(n - 1) == 'Z'
                && s.regionMatches(0, second, 0, SECONDS_END)) {
            int fraction = 0;
            for (int i = SECONDS_END + 1; i < n - 1; i++) {
                char c = s.charAt(i);
                if (c < '0' || c > '9') return Instant.parse(s); // only ASCII digits are a fraction (Instant.parse says what is wrong)
                fraction = fraction * 10 + (c - '0');
            }
            for (int i = digits; i < 9; i++) fraction *= 10;
            return Instant.ofEpochSecond(epochSecond, fraction);
        }
        Instant t = Instant.parse(s);
        // Kept only when the text up to the seconds is the instant's own (as toString writes it, in UTC): not a lower-case
        // 't', an offset, 24:00 or a leap second, which Instant.parse reads differently once a fraction follows.
        if (n > SECONDS_END && s.charAt(n - 1) == 'Z' && t.toString().regionMatches(0, s, 0, SECONDS_END)) {
            second = s.substring(0, SECONDS_END);
            epochSecond = t.getEpochSecond();
        }
        return t;
    }
}
