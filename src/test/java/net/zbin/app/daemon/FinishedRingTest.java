package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.ArrayList;
import java.util.List;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;
import net.jqwik.api.constraints.LongRange;
import org.junit.jupiter.api.Test;

/** The rolling windows of finished parts equal a plain count over every part, at any time and window. */
class FinishedRingTest {
    /** A part finished at a second, passed or not. */
    record Part(long second, boolean passed) {}

    static LineStats.Window count(List<Part> parts, long now, int windowS) {
        long n = 0, p = 0;
        for (Part x : parts)
            if (x.second() > now - windowS && x.second() <= now) {
                n++;
                if (x.passed()) p++;
            }
        return new LineStats.Window(n, p);
    }

    @Property(tries = 300)
    void windows_equalAPlainCount(@ForAll @LongRange(min = -100_000, max = 100_000) long start,
                                  @ForAll @IntRange(min = 1, max = 9000) int spanS, @ForAll @IntRange(min = 1, max = 400) int parts,
                                  @ForAll @IntRange(min = 0, max = 10_000) int seed, @ForAll @IntRange(min = 1, max = 3600) int windowS) {
        java.util.Random r = new java.util.Random(seed);
        FinishedRing ring = new FinishedRing();
        List<Part> all = new ArrayList<>();
        long t = start;
        for (int i = 0; i < parts; i++) { // in time order, as the line finishes them; several in a second or gaps of minutes
            t += r.nextInt(10) < 7 ? r.nextInt(3) : r.nextInt(Math.max(1, spanS / 10));
            Part x = new Part(t, r.nextBoolean());
            all.add(x);
            ring.add(x.second(), x.passed());
        }
        FinishedRing restored = new FinishedRing(); // carried across a restart: its state through JSON
        try {
            restored.restore(net.zbin.io.Json.mapper().readValue(net.zbin.io.Json.mapper().writeValueAsString(ring.state()), FinishedRing.State.class));
        } catch (com.fasterxml.jackson.core.JsonProcessingException e) {
            throw new AssertionError(e);
        }
        for (long now : new long[] {t, t + r.nextInt(120), t + windowS, t + 3599, t + 4000})
            for (int w : new int[] {windowS, 60, 600, 3600}) {
                assertEquals(count(all, now, w), ring.window(now, w), "now " + now + ", window " + w + " s");
                assertEquals(count(all, now, w), restored.window(now, w), "restored: now " + now + ", window " + w + " s");
            }
    }

    @Test
    void window_namesItsBound() {
        var e = assertThrows(IllegalArgumentException.class, () -> new FinishedRing().window(0, 3601));
        assertEquals("windowS: 1..3600 (was 3601)", e.getMessage());
    }
}
