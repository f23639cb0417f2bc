package net.zbin.core;

import java.time.Instant;

/**
 * A decision as the line made it: when, on which line. What the record log keeps per row and what every listener
 * of the line (stats, monitor) is told.
 *
 * @param time     when it was decided (null in a decision payload, which carries no time)
 * @param line     the line's id (null in a decision payload)
 * @param decision the decision
 */
public record DecisionEvent(Instant time, String line, Decision decision) {
    public DecisionEvent {
        if (decision == null) throw new IllegalArgumentException("decision is required");
    }
}
