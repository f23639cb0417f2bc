package net.zbin.io.mqtt;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.nio.charset.StandardCharsets;
import java.time.Instant;
import net.zbin.io.Json;

/** Outbound payloads other than decisions (contract, see the README's MQTT table). */
public final class Payloads {
    private Payloads() {}

    public static byte[] bytes(ObjectNode n) {
        try {
            return Json.mapper().writeValueAsBytes(n);
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("a tree always serialises", e);
        }
    }

    public static byte[] state(boolean online, String mode, String recipe, Instant since) {
        ObjectNode n = Json.object();
        n.put("online", online);
        n.put("mode", mode);
        Json.str(n, "recipe", recipe);
        n.put("since", since.toString());
        return bytes(n);
    }

    public static byte[] rejected(String topic, String reason) {
        ObjectNode n = Json.object();
        n.put("topic", topic);
        n.put("reason", reason);
        return bytes(n);
    }

    public static byte[] alarm(String code, String severity, boolean active, String message, Instant since) {
        return bytes(alarmNode(code, severity, active, message, since));
    }

    private static ObjectNode alarmNode(String code, String severity, boolean active, String message, Instant since) {
        ObjectNode n = Json.object();
        n.put("code", code);
        n.put("severity", severity);
        n.put("active", active);
        n.put("message", message);
        n.put("since", since.toString());
        return n;
    }

    /** An active alarm that an operator acknowledged: the alarm message with who, when and their note. */
    public static byte[] alarm(String code, String severity, boolean active, String message, Instant since, String by, Instant at, String note) {
        ObjectNode n = alarmNode(code, severity, active, message, since);
        ObjectNode a = n.putObject("acknowledged");
        a.put("by", by);
        a.put("at", at.toString());
        a.put("note", note);
        return bytes(n);
    }

    public static byte[] commandResult(String id, String cmd, boolean ok, String message) {
        ObjectNode n = Json.object();
        Json.str(n, "id", id);
        Json.str(n, "cmd", cmd);
        n.put("ok", ok);
        n.put("message", message);
        return bytes(n);
    }

    public static String text(byte[] b) { return new String(b, StandardCharsets.UTF_8); }
}
