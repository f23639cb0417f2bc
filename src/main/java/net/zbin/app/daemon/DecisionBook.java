package net.zbin.app.daemon;

import java.util.LinkedHashMap;
import java.util.Map;
import net.zbin.core.Decision;

/**
 * Decisions by seq, so a repeated trigger gets the same answer and is never measured twice, and a
 * retest finds its attempt count. Bounded: the oldest entries go first (a handler never repeats a
 * trigger that old). Used by the measuring thread only.
 */
final class DecisionBook {
    private final Map<Long, Decision> map;

    DecisionBook(int capacity) {
        this.map = new LinkedHashMap<>(1024, 0.75f, false) {
            @Override
            protected boolean removeEldestEntry(Map.Entry<Long, Decision> e) { return size() > capacity; }
        };
    }

    Decision get(long seq) { return map.get(seq); }

    void put(Decision d) { map.put(d.seq(), d); }

    int size() { return map.size(); }
}
