package net.zbin.io;

import net.zbin.core.CompensationSource;

/**
 * One row of a replay input. R/X are the compensated values (NaN when the row has none);
 * {@code reason}, {@code attempt} and {@code comp} come from a record log and are null/0/NONE
 * in a plain reading file. {@code kind} is "part" unless the row says open, short or reference.
 *
 * @param line    line number in the file (1 = header)
 * @param freqHz  test frequency in Hz
 * @param rOhm    compensated R in ohms
 * @param xOhm    compensated X in ohms
 * @param rawROhm raw R, NaN if absent
 * @param rawXOhm raw X, NaN if absent
 */
public record ReplayRow(long line, double freqHz, double rOhm, double xOhm, double rawROhm, double rawXOhm,
                        String reason, int attempt, CompensationSource comp, String kind) {
    /** True for the handler's fixture checks, which are not parts and are not graded on replay. */
    public boolean isCheck() { return !kind.equals("part"); }
}
