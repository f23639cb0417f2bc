package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.time.Instant;
import java.util.List;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;
import net.jqwik.api.constraints.LongRange;
import net.jqwik.api.constraints.Size;
import org.junit.jupiter.api.Test;

class RowTimesTest {
    /** Rows as a busy line writes them: runs of rows in one second, nanosecond parts of 3, 6 or 9 digits or none. */
    @Property(tries = 2_000, seed = "7301")
    void aRunOfRows_readsAsInstantParseReadsEachOne(@ForAll @LongRange(min = 946_684_800L, max = 4_102_444_800L) long startSecond,
            @ForAll @Size(min = 1, max = 40) List<@IntRange(min = 0, max = 999_999_999) Integer> nanos,
            @ForAll @Size(min = 1, max = 40) List<@IntRange(min = 0, max = 2) Integer> secondSteps) {
        RowTimes times = new RowTimes();
        long second = startSecond;
        for (int i = 0; i < nanos.size(); i++) {
            second += secondSteps.get(i % secondSteps.size());
            int n = nanos.get(i);
            int kept = switch (i % 4) { case 0 -> n; case 1 -> n / 1_000_000 * 1_000_000; case 2 -> n / 1000 * 1000; default -> 0; };
            String s = Instant.ofEpochSecond(second, kept).toString();
            assertEquals(Instant.parse(s), times.parse(s), s);
        }
    }

    @Test
    void otherShapes_goToInstantParse_andDoNotSpoilTheNextRow() {
        RowTimes times = new RowTimes();
        assertEquals(Instant.parse("2026-12-03T05:59:01.5Z"), times.parse("2026-12-03T05:59:01.5Z"));
        // the same second written with an offset (not what the log writes): parsed whole, and the cache stays UTC
        assertEquals(Instant.parse("2026-12-03T05:59:01.25+01:00"), times.parse("2026-12-03T05:59:01.25+01:00"));
        assertEquals(Instant.parse("2026-12-03T05:59:01.75Z"), times.parse("2026-12-03T05:59:01.75Z"));
        assertEquals(Instant.parse("2026-12-03T05:59:01Z"), times.parse("2026-12-03T05:59:01Z"));
        assertThrows(RuntimeException.class, () -> times.parse("2026-12-03T05:59:01.-5Z"));
        assertThrows(RuntimeException.class, () -> times.parse("2026-12-03T05:59:01.1234567890Z"));
        assertThrows(RuntimeException.class, () -> times.parse("not a time"));
        // digits Instant.parse does not take (Arabic-Indic five), after a row of the same second
        assertThrows(RuntimeException.class, () -> times.parse("2026-12-03T05:59:01.\u0665Z"));
        assertThrows(RuntimeException.class, () -> times.parse("2026-12-03T05:59:01.1\u0665Z"));
    }

    @Test
    void secondsInstantParseReadsAsAnotherSecond_areNotKept() {
        RowTimes times = new RowTimes();
        // 24:00 is the next day's start for Instant.parse, but only without a fraction
        assertEquals(Instant.parse("2026-12-03T24:00:00Z"), times.parse("2026-12-03T24:00:00Z"));
        assertThrows(RuntimeException.class, () -> times.parse("2026-12-03T24:00:00.5Z"));
        // ISO 8601 lets the 'T' be lower case; the next row's upper-case 'T' must not be matched against it blindly
        assertEquals(Instant.parse("2026-12-03t05:59:01.5Z"), times.parse("2026-12-03t05:59:01.5Z"));
        assertEquals(Instant.parse("2026-12-03T05:59:01.25Z"), times.parse("2026-12-03T05:59:01.25Z"));
    }
}
