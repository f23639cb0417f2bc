package net.zbin.app.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/** The warm-up spends what a fast start leaves of the time to ready, within its least and most. */
class WarmUpBoundTest {
    @Test
    void aFastStart_warmsUpUntilTheAim_aSlowOneOrAnOldJvmTheLeast_neverBeyondTheMost() {
        assertEquals(Daemon.WARM_UP_MS, Daemon.warmUpMs(3_600_000), "a daemon inside a long-running JVM (tests, benches)");
        assertEquals(Daemon.WARM_UP_MS, Daemon.warmUpMs(Daemon.READY_AIM_MS), "no time to spare");
        assertEquals(Daemon.WARM_UP_MS, Daemon.warmUpMs(Daemon.READY_AIM_MS - Daemon.WARM_UP_MS + 1));
        assertEquals(900, Daemon.warmUpMs(Daemon.READY_AIM_MS - 900), "a start from a class-data archive");
        assertEquals(Daemon.WARM_UP_MAX_MS, Daemon.warmUpMs(0), "never beyond the most");
    }
}
