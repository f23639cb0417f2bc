package net.zbin.core;

/**
 * A decision as the handler receives it: the trigger's identity, the grading, and timing.
 *
 * @param seq       the trigger's idempotency key (−1 when there was no trigger, e.g. {@code zbin calc})
 * @param part      part id from the trigger, may be empty
 * @param lot       lot id from the trigger, may be empty
 * @param kind      part, open, short or reference
 * @param recipe    recipe name
 * @param grading   the outcome
 * @param latencyMs trigger arrival to decision publish, in milliseconds (NaN when not timed)
 * @param repeat    true when this answers a repeated trigger from the decision already made
 * @param attempt   0 for a first presentation, n for the n-th retest
 */
public record Decision(long seq, String part, String lot, Trigger.Kind kind, String recipe, Grading grading,
                       double latencyMs, boolean repeat, int attempt) {
    public Decision {
        if (grading == null) throw new IllegalArgumentException("grading is required");
        if (kind == null) kind = Trigger.Kind.PART;
        if (attempt < 0) throw new IllegalArgumentException("attempt must be >= 0 (was " + attempt + ")");
    }

    public Decision asRepeat() { return new Decision(seq, part, lot, kind, recipe, grading, latencyMs, true, attempt); }
}
