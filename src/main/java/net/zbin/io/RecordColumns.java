package net.zbin.io;

import java.util.List;

/**
 * Record-log columns (contract, see the README's record log section). New columns are only ever appended at the end:
 * {@code attempt} (0 first presentation, n the n-th retest) lets a replay reproduce retest bins.
 */
public final class RecordColumns {
    private RecordColumns() {}

    public static final List<String> ALL = DecisionFields.COLUMNS;

    /** The columns a replay input must have, by name. */
    public static final List<String> REPLAY_REQUIRED = List.of("freq_hz", "r_ohm", "x_ohm");
}
