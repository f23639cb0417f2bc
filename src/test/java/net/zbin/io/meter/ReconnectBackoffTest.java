package net.zbin.io.meter;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import net.zbin.core.FaultKind;
import net.zbin.core.TestConditions;
import org.junit.jupiter.api.Test;

/** Reconnect attempts double their delay up to the profile's maximum; time is advanced, never slept. */
class ReconnectBackoffTest {
    /** A clock the test moves by hand. */
    static final class HandClock extends Clock {
        Instant now = Instant.parse("2026-11-30T06:00:00Z");
        public ZoneOffset getZone() { return ZoneOffset.UTC; }
        public Clock withZone(java.time.ZoneId z) { return this; }
        public Instant instant() { return now; }
        void advance(long ms) { now = now.plus(Duration.ofMillis(ms)); }
    }

    /** A link that cannot be opened, and counts the tries. */
    static final class DeadLink implements Transport {
        int opens;
        public void open() throws IOException { opens++; throw new IOException("connection refused"); }
        public boolean isOpen() { return false; }
        public void write(byte[] d) throws IOException { throw new IOException("closed"); }
        public int read(byte[] b, int t) throws IOException { throw new IOException("closed"); }
        public int available() throws IOException { throw new IOException("closed"); }
        public String describe() { return "dead link"; }
        public void close() { }
    }

    @Test
    void failedOpens_backOffDoublingToTheMaximum_withoutTryingInBetween() throws Exception {
        MeterProfile p = Profiles.sim(TransportSpec.tcp("127.0.0.1", 1)); // reconnect: initial 50 ms, max 2000 ms
        HandClock clock = new HandClock();
        DeadLink link = new DeadLink();
        ProfileMeterSession s = new ProfileMeterSession(p, link, clock);
        TestConditions c = new TestConditions(1000, 1, "fast", 1);
        long[] expectedDelays = {50, 100, 200, 400, 800, 1600, 2000, 2000};
        for (long delay : expectedDelays) {
            int before = link.opens;
            MeterException e = assertThrows(MeterException.class, () -> s.apply(c));
            assertEquals(FaultKind.DISCONNECTED, e.kind());
            assertEquals(before + 1, link.opens, "one attempt");
            clock.advance(delay - 1);
            MeterException waiting = assertThrows(MeterException.class, () -> s.apply(c));
            assertTrue(waiting.getMessage().contains("next attempt in 1 ms"), waiting.getMessage());
            assertEquals(before + 1, link.opens, "no attempt before the backoff has passed");
            clock.advance(1);
        }
    }
}
