package net.zbin.core;

/**
 * Handler bins for parts that get no value grade. Several may share one physical bin.
 *
 * @param low      value below the lowest grade
 * @param high     value above the highest grade
 * @param gate     a D/Q/ESR/θ gate failed
 * @param contact  open contact (the reading is the fixture, not a part)
 * @param shortBin short across the contacts
 * @param overload meter out of range
 * @param fault    meter or compensation fault (timeout, garbled, error, missing compensation)
 */
public record RejectBins(int low, int high, int gate, int contact, int shortBin, int overload, int fault) {
    public RejectBins {
        String[] keys = {"reject.low", "reject.high", "reject.gate", "reject.contact", "reject.short", "reject.overload", "reject.fault"};
        int[] v = {low, high, gate, contact, shortBin, overload, fault};
        for (int i = 0; i < v.length; i++)
            if (v[i] < 0 || v[i] > 999) throw new SpecException(keys[i], "bin must be 0..999 (was " + v[i] + ")");
    }

    /** Each reject bin with its key, for cross-checks against grade bins. */
    public int[] all() { return new int[] {low, high, gate, contact, shortBin, overload, fault}; }

    public static final String[] KEYS = {"reject.low", "reject.high", "reject.gate", "reject.contact", "reject.short", "reject.overload", "reject.fault"};
}
