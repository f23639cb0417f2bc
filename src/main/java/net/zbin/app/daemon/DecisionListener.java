package net.zbin.app.daemon;

import net.zbin.io.DecisionFields;

/**
 * Hears of every decision after it was published to the handler and written to the record log: the
 * line's figures today, the line monitor and metrics next. Called on the measuring thread (and, for
 * answers given while the line is too busy to measure, on the overflow thread), one call at a time;
 * it must not block and must not throw — the next part waits on it.
 */
public interface DecisionListener {
    void decided(net.zbin.core.DecisionEvent e);
}
