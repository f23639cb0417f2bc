package net.zbin.io;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.time.Instant;

/**
 * What the record log cannot tell a restarted daemon: the lot named by a {@code lot} command, when the counters
 * were last reset, and the counters of answers that write no row (repeats, rejected messages, reused seqs, busy
 * answers). Kept in {@code <state_dir>/line-<line>.json}, written atomically by the daemon every dashboard period,
 * at once after a {@code lot} or {@code reset-counters} command, and at a clean stop.
 *
 * @param lot        the line's lot
 * @param lotSince   when that lot started (or the counters were last reset within it)
 * @param resetAt    when reset-counters last ran, null if never
 * @param repeats    repeat answers given
 * @param rejected   unusable MQTT messages refused
 * @param reusedSeqs seqs that came back as another presentation
 * @param busy       line-busy answers given
 * @param savedAt    when this was written
 */
public record LineState(String lot, Instant lotSince, Instant resetAt, long repeats, long rejected, long reusedSeqs, long busy,
                        Instant savedAt) {
    public static Path file(Path stateDir, String line) { return stateDir.resolve("line-" + line + ".json"); }

    /** The saved state, or null when there is none (a first start) or it cannot be read (then logged and ignored). */
    public static LineState load(Path stateDir, String line) {
        Path f = file(stateDir, line);
        if (!Files.exists(f)) return null;
        try {
            JsonNode n = Json.mapper().readTree(f.toFile());
            return new LineState(n.path("lot").asText(""), instant(n, "lot_since"), instant(n, "reset_at"), n.path("repeats").asLong(),
                    n.path("rejected").asLong(), n.path("seq_reused").asLong(), n.path("busy").asLong(), instant(n, "saved_at"));
        } catch (IOException | RuntimeException e) {
            org.slf4j.LoggerFactory.getLogger(LineState.class).warn("line state {} unreadable, starting without it: {}", f, e.toString());
            return null;
        }
    }

    private static Instant instant(JsonNode n, String key) {
        JsonNode v = n.get(key);
        return v == null || v.isNull() ? null : Instant.parse(v.asText());
    }

    /** Writes atomically (temp file + rename). */
    public void save(Path stateDir, String line) throws IOException {
        ObjectNode n = Json.object();
        n.put("lot", lot);
        n.put("lot_since", lotSince == null ? null : lotSince.toString());
        n.put("reset_at", resetAt == null ? null : resetAt.toString());
        n.put("repeats", repeats);
        n.put("rejected", rejected);
        n.put("seq_reused", reusedSeqs);
        n.put("busy", busy);
        n.put("saved_at", savedAt.toString());
        Path f = file(stateDir, line), tmp = f.resolveSibling(f.getFileName() + ".tmp");
        Files.createDirectories(stateDir);
        Files.write(tmp, Json.mapper().writeValueAsBytes(n));
        Files.move(tmp, f, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
    }
}
