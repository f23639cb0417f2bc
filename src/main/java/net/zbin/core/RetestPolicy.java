package net.zbin.core;

/**
 * @param count how many times a part with an unclean reading is sent back before it is rejected
 * @param bin   the handler bin (or code) meaning "present this part again"
 */
public record RetestPolicy(int count, int bin) {
    public RetestPolicy {
        if (count < 0 || count > 10) throw new SpecException("retest.count", "must be 0..10 (was " + count + ")");
        if (bin < 0 || bin > 999) throw new SpecException("retest.bin", "bin must be 0..999 (was " + bin + ")");
    }
}
