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

    /** Parses a JSON object payload within the size limit; the bytes must be well-formed UTF-8 (RFC 3629: no overlong forms). */
    public static JsonNode object(byte[] payload) throws PayloadException {
        if (payload.length > MAX_BYTES) throw new PayloadException("payload is " + payload.length + " bytes, limit " + MAX_BYTES);
        strictUtf8(payload);
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

    /**
     * A string field, null when absent; any other type is refused, and so is text with control characters
     * (C0, DEL, C1: a NUL or a line break in a part id would end up in the record log and in every report).
     */
    public static String text(JsonNode n, String key) throws PayloadException {
        JsonNode v = n.get(key);
        if (v == null || v.isNull()) return null;
        if (!v.isTextual()) throw new PayloadException(key + " must be a string (was " + v + ")");
        String s = v.asText();
        if (s.length() > 128) throw new PayloadException(key + " is longer than 128 characters");
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            if (c < 0x20 || (c >= 0x7f && c < 0xa0))
                throw new PayloadException(key + " holds a control character (U+" + String.format("%04X", (int) c) + ") at position " + i);
        }
        return s;
    }

    /** Refuses bytes that are not well-formed UTF-8; plain ASCII (the usual trigger) is checked by one scan. */
    private static void strictUtf8(byte[] payload) throws PayloadException {
        boolean ascii = true;
        for (byte b : payload) if (b < 0) { ascii = false; break; }
        if (ascii) return;
        try {
            java.nio.charset.StandardCharsets.UTF_8.newDecoder()
                    .onMalformedInput(java.nio.charset.CodingErrorAction.REPORT)
                    .onUnmappableCharacter(java.nio.charset.CodingErrorAction.REPORT)
                    .decode(java.nio.ByteBuffer.wrap(payload));
        } catch (java.nio.charset.CharacterCodingException e) {
            throw new PayloadException("payload is not well-formed UTF-8 (" + e.getMessage() + ")");
        }
    }
}
