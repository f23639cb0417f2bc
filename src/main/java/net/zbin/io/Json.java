package net.zbin.io;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.node.ObjectNode;

/** The one JSON mapper, and helpers that keep NaN/Infinity out of payloads (written as null). */
public final class Json {
    private static final ObjectMapper MAPPER = new ObjectMapper().disable(SerializationFeature.FAIL_ON_EMPTY_BEANS);

    private Json() {}

    public static ObjectMapper mapper() { return MAPPER; }

    public static ObjectNode object() { return MAPPER.createObjectNode(); }

    /** Puts a finite number, or null for NaN/±Infinity (JSON has neither). */
    public static ObjectNode num(ObjectNode n, String key, double v) {
        if (Double.isFinite(v)) n.put(key, v);
        else n.putNull(key);
        return n;
    }

    public static ObjectNode str(ObjectNode n, String key, String v) {
        if (v == null) n.putNull(key);
        else n.put(key, v);
        return n;
    }
}
