package net.zbin.app.daemon;

import java.time.Instant;
import java.util.Map;
import net.zbin.core.AlarmCode;
import net.zbin.core.LineMonitor;

/**
 * Everything that shows the line, at one instant, immutable: the dashboard topic is its encoding, and anything else
 * that shows the line (a page, metrics) reads the same snapshot rather than the live accumulators. Taken by the
 * dashboard ticker (and at a lot's end, for that lot's last figures).
 *
 * @param alarms     the active alarms with their messages, since when and who acknowledged them
 * @param meterLink  "up", "down" (no answer) or "setup-refused" (it answers but refused the test conditions)
 * @param deadlineMs the handler's deadline, the latency figures' yardstick
 */
record LineSnapshot(Instant at, String line, String recipe, Mode mode, LineStats.Snapshot stats, LineMonitor.Snapshot monitor,
                    Map<AlarmCode, LineMode.Alarm> alarms, long recordBacklog, long recordDropped, long mqttBuffered,
                    String meterLink, int deadlineMs) {
    LineSnapshot {
        alarms = Map.copyOf(alarms);
    }
}
