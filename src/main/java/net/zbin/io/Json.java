package net.zbin.io;

import com.fasterxml.jackson.core.StreamWriteFeature;
import com.fasterxml.jackson.core.io.NumberOutput;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.json.JsonMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;

/** The one JSON mapper, and helpers that keep NaN/Infinity out of payloads (written as null). */
public final class Json {
    /**
     * Doubles are written as the shortest decimal that reads back as the same double (Jackson's fast writer, the
     * Schubfach algorithm): the double {@code Double.toString}'s text reads as, in the same form, now and then in fewer
     * digits, at a fraction of its cost per decision.
     */
    private static final ObjectMapper MAPPER = JsonMapper.builder().enable(StreamWriteFeature.USE_FAST_DOUBLE_WRITER)
            .disable(SerializationFeature.FAIL_ON_EMPTY_BEANS).build();

    private Json() {}

    public static ObjectMapper mapper() { return MAPPER; }

    public static ObjectNode object() { return MAPPER.createObjectNode(); }

    /** Puts a finite number, or null for NaN/±Infinity (JSON has neither). */
    public static ObjectNode num(ObjectNode n, String key, double v) {
        if (Double.isFinite(v)) n.put(key, v);
        else n.putNull(key);
        return n;
    }

    /** A finite double as the record log writes it: the shortest decimal that reads back as the same double. */
    public static String text(double v) { return NumberOutput.toString(v, true); }

    public static ObjectNode str(ObjectNode n, String key, String v) {
        if (v == null) n.putNull(key);
        else n.put(key, v);
        return n;
    }
}
