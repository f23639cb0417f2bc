package net.zbin.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class LineStateTest {
    @TempDir
    Path dir;

    @Test
    void aSavedState_readsBackAsItWas_withAndWithoutAReset() throws Exception {
        LineState s = new LineState("LOT-A", Instant.parse("2026-12-02T07:00:00Z"), null, 10, 5, 3, 2, Instant.parse("2026-12-02T07:01:00Z"));
        s.save(dir, "l1");
        assertEquals(s, LineState.load(dir, "l1"));
        LineState r = new LineState("LOT-A", Instant.parse("2026-12-02T07:00:00Z"), Instant.parse("2026-12-02T07:00:30Z"), 0, 0, 0, 0,
                Instant.parse("2026-12-02T07:01:00Z"));
        r.save(dir, "l1");
        assertEquals(r, LineState.load(dir, "l1"));
    }

    @Test
    void noFileOrABrokenOne_isNoState() throws Exception {
        assertNull(LineState.load(dir, "none"));
        Files.writeString(LineState.file(dir, "bad"), "{not json");
        assertNull(LineState.load(dir, "bad"));
    }
}
