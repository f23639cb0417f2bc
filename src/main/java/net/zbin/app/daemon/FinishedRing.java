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
        bump(secStamp, secCount, secPassed, second, passed);
        bump(minStamp, minCount, minPassed, Math.floorDiv(second, 60L), passed);
    }

    private static void bump(long[] stamp, long[] count, long[] pass, long key, boolean passed) {
        int i = (int) Math.floorMod(key, (long) stamp.length);
        if (stamp[i] != key) {
            stamp[i] = key;
            count[i] = 0;
            pass[i] = 0;
        }
        count[i]++;
        if (passed) pass[i]++;
    }

    /** Adds the slots of keys {@code from}..{@code to} (inclusive) that still hold those keys to {@code sum} (parts, passed). */
    private static void sum(long[] stamp, long[] count, long[] pass, long from, long to, long[] sum) {
        for (long k = from; k <= to; k++) {
            int i = (int) Math.floorMod(k, (long) stamp.length);
            if (stamp[i] == k) {
                sum[0] += count[i];
                sum[1] += pass[i];
            }
        }
    }

    /**
     * The slots in use of one ring, compact (a busy hour is 3 600 of them, written every checkpoint): the newest key (a
     * second or minute since the epoch), and for each slot in use how many keys before the newest it is, its parts
     * finished and passed.
     */
    record Slots(long newest, int[] before, long[] parts, long[] passed) {
        Slots {
            if (before.length != parts.length || passed.length != parts.length)
                throw new IllegalArgumentException("slots: before, parts and passed must be as long (were " + before.length + ", "
                        + parts.length + ", " + passed.length + ")");
        }
    }

    /** The slots in use, to carry the windows across a restart of the daemon. */
    record State(Slots seconds, Slots minutes) {}

    State state() { return new State(slots(secStamp, secCount, secPassed), slots(minStamp, minCount, minPassed)); }

    private static Slots slots(long[] stamp, long[] count, long[] pass) {
        long newest = Long.MIN_VALUE;
        int n = 0;
        for (long k : stamp)
            if (k != Long.MIN_VALUE) {
                n++;
                newest = Math.max(newest, k);
            }
        int[] before = new int[n];
        long[] c = new long[n], p = new long[n];
        for (int i = 0, j = 0; i < stamp.length; i++)
            if (stamp[i] != Long.MIN_VALUE) {
                before[j] = (int) (newest - stamp[i]); // a ring holds keys within its length of the newest
                c[j] = count[i];
                p[j++] = pass[i];
            }
        return new Slots(n == 0 ? 0 : newest, before, c, p);
    }

    /** Takes up {@code s} in place of what this ring holds. */
    void restore(State s) {
        java.util.Arrays.fill(secStamp, Long.MIN_VALUE);
        java.util.Arrays.fill(minStamp, Long.MIN_VALUE);
        put(secStamp, secCount, secPassed, s.seconds());
        put(minStamp, minCount, minPassed, s.minutes());
    }

    private static void put(long[] stamp, long[] count, long[] pass, Slots s) {
        for (int j = 0; j < s.parts().length; j++) {
            long key = s.newest() - s.before()[j];
            int i = (int) Math.floorMod(key, (long) stamp.length);
            stamp[i] = key;
            count[i] = s.parts()[j];
            pass[i] = s.passed()[j];
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
        long[] sum = new long[2];
        if (firstMin == lastMin) {
            sum(secStamp, secCount, secPassed, first, nowSecond, sum);
        } else {
            sum(secStamp, secCount, secPassed, first, (firstMin + 1) * 60 - 1, sum); // the seconds of the oldest minute inside
            sum(minStamp, minCount, minPassed, firstMin + 1, lastMin - 1, sum); // whole minutes
            sum(secStamp, secCount, secPassed, lastMin * 60, nowSecond, sum); // the current minute so far
        }
        return new LineStats.Window(sum[0], sum[1]);
    }
}
