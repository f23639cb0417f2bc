package net.zbin.core;

/**
 * A reading as a record log (or any reading file) kept it, to be graded again. R/X are the
 * compensated values (NaN when the row has none); {@code reason}, {@code attempt} and {@code comp}
 * come from a record log and are null/0/NONE in a plain reading file.
 *
 * @param line    line number in the file it came from (1 = header), for messages
 * @param freqHz  test frequency in Hz
 * @param rOhm    compensated R in ohms
 * @param xOhm    compensated X in ohms
 * @param rawROhm raw R, NaN if absent
 * @param rawXOhm raw X, NaN if absent
 * @param reason  the recorded reason, or null
 * @param attempt 0 for a first presentation, n for the n-th retest
 * @param comp    compensation that was applied to R/X
 * @param kind    a part, or the handler's open, short or reference check
 * @param seq     the handler's seq from a record log, or −1 when the file has none
 * @param part    the part id, or "" when the file has none
 * @param lot     the lot, or "" when the file has none (then the whole file is one lot)
 * @param readings readings R/X are the mean of (1 when the file does not say)
 * @param steps    the readings of the plan's later steps (compensated at their frequencies), in order
 */
public record RecordedReading(long line, double freqHz, double rOhm, double xOhm, double rawROhm, double rawXOhm,
                              Reason reason, int attempt, CompensationSource comp, Trigger.Kind kind, long seq, String part, String lot,
                              int readings, java.util.List<Grading.StepReading> steps) {
    public RecordedReading {
        if (kind == null) throw new IllegalArgumentException("kind is required");
        if (part == null) throw new IllegalArgumentException("part must not be null (\"\" when the file has none)");
        if (lot == null) throw new IllegalArgumentException("lot must not be null (\"\" when the file has none)");
        if (readings < 1) throw new IllegalArgumentException("readings must be >= 1 (was " + readings + ")");
        steps = steps == null ? java.util.List.of() : java.util.List.copyOf(steps);
    }

    /** A reading of a plain reading file: no seq, part or lot. */
    public RecordedReading(long line, double freqHz, double rOhm, double xOhm, double rawROhm, double rawXOhm,
                           Reason reason, int attempt, CompensationSource comp, Trigger.Kind kind) {
        this(line, freqHz, rOhm, xOhm, rawROhm, rawXOhm, reason, attempt, comp, kind, -1, "", "", 1, java.util.List.of());
    }

    /** True for the handler's fixture checks, which are not parts and are not graded again. */
    public boolean isCheck() { return kind != Trigger.Kind.PART; }
}
