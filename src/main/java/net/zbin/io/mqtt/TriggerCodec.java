package net.zbin.io.mqtt;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import net.zbin.core.Trigger;
import net.zbin.io.Json;

/** Reads trigger payloads (contract, see the README's MQTT table). Unknown keys are ignored for forward compatibility. */
public final class TriggerCodec {
    /** Largest payload accepted, in bytes. */
    public static final int MAX_BYTES = 4096;

    private TriggerCodec() {}

    public static Trigger decode(byte[] payload) throws PayloadException {
        JsonNode n = object(payload);
        JsonNode seq = n.get("seq");
        if (seq == null || seq.isNull()) throw new PayloadException("seq is missing");
        if (!seq.isIntegralNumber() || !seq.canConvertToLong()) throw new PayloadException("seq must be an integer >= 0 (was " + seq + ")");
        long retestOf = -1;
        JsonNode r = n.get("retest_of");
        if (r != null && !r.isNull()) {
            if (!r.isIntegralNumber() || !r.canConvertToLong()) throw new PayloadException("retest_of must be an integer >= 0 (was " + r + ")");
            retestOf = r.asLong();
            if (retestOf < 0) throw new PayloadException("retest_of must be an integer >= 0 (was " + r + ")");
        }
        try {
            String kind = text(n, "kind");
            return new Trigger(seq.asLong(), text(n, "part"), text(n, "lot"),
                    kind == null ? Trigger.Kind.PART : Trigger.Kind.parse(kind), retestOf);
        } catch (IllegalArgumentException e) {
            throw new PayloadException(e.getMessage());
        }
    }

    /** Parses a JSON object payload within the size limit. */
    public static JsonNode object(byte[] payload) throws PayloadException {
        if (payload.length > MAX_BYTES) throw new PayloadException("payload is " + payload.length + " bytes, limit " + MAX_BYTES);
        JsonNode n;
        try {
            n = Json.mapper().readTree(payload);
        } catch (JsonProcessingException e) {
            throw new PayloadException("not valid JSON: " + e.getOriginalMessage());
        } catch (IOException e) {
            throw new PayloadException("unreadable payload: " + e.getMessage());
        }
        if (n == null || !n.isObject()) throw new PayloadException("payload must be a JSON object");
        return n;
    }

    /** A string field, null when absent; any other type is refused. */
    public static String text(JsonNode n, String key) throws PayloadException {
        JsonNode v = n.get(key);
        if (v == null || v.isNull()) return null;
        if (!v.isTextual()) throw new PayloadException(key + " must be a string (was " + v + ")");
        if (v.asText().length() > 128) throw new PayloadException(key + " is longer than 128 characters");
        return v.asText();
    }
}
