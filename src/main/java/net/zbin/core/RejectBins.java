package net.zbin.core;

/**
 * Handler bins for parts that get no value grade. Several may share one physical bin.
 *
 * @param low      value below the lowest grade
 * @param high     value above the highest grade
 * @param gate     a D/Q/ESR/θ gate failed, or the phase is not plausible for the part type
 * @param contact  open contact (the reading is the fixture, not a part)
 * @param shortBin short across the contacts
 * @param overload meter out of range
 * @param fault    meter or compensation fault (timeout, garbled, error, missing compensation)
 * @param guard    inside a guard band; −1: the low or high bin by the side of the nominal
 */
public record RejectBins(int low, int high, int gate, int contact, int shortBin, int overload, int fault, int guard) {
    public static final String[] KEYS = {"reject.low", "reject.high", "reject.gate", "reject.contact", "reject.short",
            "reject.overload", "reject.fault", "reject.guard"};

    public RejectBins {
        int[] v = {low, high, gate, contact, shortBin, overload, fault};
        for (int i = 0; i < v.length; i++)
            if (v[i] < 0 || v[i] > 999) throw new SpecException(KEYS[i], "bin must be 0..999 (was " + v[i] + ")");
        if (guard < -1 || guard > 999) throw new SpecException("reject.guard", "bin must be 0..999 (was " + guard + ")");
    }

    /** Without a bin of its own for guard-band rejects. */
    public RejectBins(int low, int high, int gate, int contact, int shortBin, int overload, int fault) {
        this(low, high, gate, contact, shortBin, overload, fault, -1);
    }

    /** Each reject bin, in the order of {@link #KEYS}; an unset guard bin is left out. */
    public int[] all() {
        return guard < 0 ? new int[] {low, high, gate, contact, shortBin, overload, fault}
                : new int[] {low, high, gate, contact, shortBin, overload, fault, guard};
    }

    /** The bin of a reject class; a guard-band reject without its own bin goes high (use {@link #guardBin}). */
    public int bin(Reason.RejectClass c) {
        return switch (c) {
            case LOW -> low;
            case HIGH -> high;
            case GATE -> gate;
            case CONTACT -> contact;
            case SHORT -> shortBin;
            case OVERLOAD -> overload;
            case FAULT -> fault;
            case GUARD -> guardBin(false);
        };
    }

    /** The bin of a guard-band reject on the low or high side. */
    public int guardBin(boolean lowSide) { return guard >= 0 ? guard : lowSide ? low : high; }
}
