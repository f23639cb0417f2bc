package net.zbin.app.status;

import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import java.time.Clock;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentSkipListMap;
import net.zbin.io.Json;

/**
 * The lines a status server shows, each a {@link LineBoard}, and one version number that every change raises, so a
 * page's event stream waits for news without polling. Fed with the lines' own payloads: by the daemon of the one line
 * it serves, or by a plant panel from the broker. A payload that is not a JSON object is ignored.
 */
public final class Boards {
    /** Which of a line's messages a payload is. */
    public enum Kind { DASHBOARD, STATE, ALARM }

    private final Clock clock;
    private final Map<String, LineBoard> lines = new ConcurrentSkipListMap<>();
    /** Lines are added as they are heard (a plant panel); false: only those named at the start (a daemon). */
    private final boolean open;
    private long version;
    private boolean closed;

    private Boards(Clock clock, boolean open, List<String> fixed) {
        this.clock = clock;
        this.open = open;
        for (String l : fixed) lines.put(l, new LineBoard(l));
    }

    /** The one line a daemon serves. */
    public static Boards of(String line, Clock clock) { return new Boards(clock, false, List.of(line)); }

    /** Every line heard on the broker (a plant panel). */
    public static Boards plant(Clock clock) { return new Boards(clock, true, List.of()); }

    public void heard(String line, Kind kind, byte[] payload) {
        JsonNode n;
        try {
            n = Json.mapper().readTree(payload);
        } catch (IOException e) {
            return;
        }
        if (n != null) heard(line, kind, n);
    }

    public void heard(String line, Kind kind, JsonNode n) {
        if (n == null || !n.isObject()) return;
        LineBoard b = open ? lines.computeIfAbsent(line, LineBoard::new) : lines.get(line);
        if (b == null) return;
        var now = clock.instant();
        switch (kind) {
            case DASHBOARD -> b.dashboard(n, now);
            case STATE -> b.state(n, now);
            case ALARM -> b.alarm(n, now);
        }
        changed();
    }

    LineBoard line(String id) { return lines.get(id); }

    java.util.Collection<LineBoard> all() { return lines.values(); }

    /** The only line when a daemon serves its own, else null. */
    String single() { return open || lines.size() != 1 ? null : lines.keySet().iterator().next(); }

    Clock clock() { return clock; }

    synchronized long version() { return version; }

    private synchronized void changed() {
        version++;
        notifyAll();
    }

    /** Waits until the version passes {@code seen}, the time runs out or the boards close; returns the version then. */
    synchronized long awaitNewer(long seen, long timeoutMs) throws InterruptedException {
        long end = System.nanoTime() + timeoutMs * 1_000_000;
        while (version <= seen && !closed) {
            long left = (end - System.nanoTime()) / 1_000_000;
            if (left <= 0) break;
            wait(left);
        }
        return version;
    }

    synchronized boolean closed() { return closed; }

    /** Ends every waiting event stream. */
    synchronized void close() {
        closed = true;
        notifyAll();
    }
}
