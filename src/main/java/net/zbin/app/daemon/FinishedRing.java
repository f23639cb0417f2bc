package net.zbin.app.daemon;

/**
 * Parts finished and passed per second over the last hour, for rolling windows of whole minutes (the last minute,
 * 10 minutes, hour). A ring of per-second counts beside a ring of per-minute sums, so a window is read from the
 * sums of its whole minutes plus the seconds of the two minutes at its ends — at most 180 slots, not 3 600 — and
 * reading the windows at a lot change or for a dashboard costs the measuring thread and the ticker next to nothing.
 * Memory does not grow with the lot. Not thread-safe: the owner guards it.
 */
final class FinishedRing {
    static final int SECONDS = 3600, MINUTES = SECONDS / 60;

    private final long[] secStamp = new long[SECONDS], secCount = new long[SECONDS], secPassed = new long[SECONDS];
    private final long[] minStamp = new long[MINUTES], minCount = new long[MINUTES], minPassed = new long[MINUTES];

    FinishedRing() {
        java.util.Arrays.fill(secStamp, Long.MIN_VALUE);
        java.util.Arrays.fill(minStamp, Long.MIN_VALUE);
    }

    /** One part finished in {@code second} (epoch seconds). */
    void add(long second, boolean passed) {
        int i = (int) Math.floorMod(second, (long) SECONDS);
        if (secStamp[i] != second) {
            secStamp[i] = second;
            secCount[i] = 0;
            secPassed[i] = 0;
        }
        secCount[i]++;
        long minute = Math.floorDiv(second, 60L);
        int m = (int) Math.floorMod(minute, (long) MINUTES);
        if (minStamp[m] != minute) {
            minStamp[m] = minute;
            minCount[m] = 0;
            minPassed[m] = 0;
        }
        minCount[m]++;
        if (passed) {
            secPassed[i]++;
            minPassed[m]++;
        }
    }

    /**
     * Parts finished and passed in the seconds ({@code nowSecond} − {@code windowS}, {@code nowSecond}].
     *
     * @param windowS 1..{@value #SECONDS}
     */
    LineStats.Window window(long nowSecond, int windowS) {
        if (windowS < 1 || windowS > SECONDS) throw new IllegalArgumentException("windowS: 1.." + SECONDS + " (was " + windowS + ")");
        long first = nowSecond - windowS + 1;
        long firstMin = Math.floorDiv(first, 60L), lastMin = Math.floorDiv(nowSecond, 60L);
        long n = 0, p = 0;
        if (firstMin == lastMin) {
            for (long s = first; s <= nowSecond; s++) {
                int i = (int) Math.floorMod(s, (long) SECONDS);
                if (secStamp[i] == s) { n += secCount[i]; p += secPassed[i]; }
            }
            return new LineStats.Window(n, p);
        }
        for (long s = first; s < (firstMin + 1) * 60; s++) { // the seconds of the oldest minute inside the window
            int i = (int) Math.floorMod(s, (long) SECONDS);
            if (secStamp[i] == s) { n += secCount[i]; p += secPassed[i]; }
        }
        for (long m = firstMin + 1; m < lastMin; m++) { // whole minutes
            int k = (int) Math.floorMod(m, (long) MINUTES);
            if (minStamp[k] == m) { n += minCount[k]; p += minPassed[k]; }
        }
        for (long s = lastMin * 60; s <= nowSecond; s++) { // the seconds of the current minute so far
            int i = (int) Math.floorMod(s, (long) SECONDS);
            if (secStamp[i] == s) { n += secCount[i]; p += secPassed[i]; }
        }
        return new LineStats.Window(n, p);
    }
}
