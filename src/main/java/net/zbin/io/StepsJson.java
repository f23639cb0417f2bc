package net.zbin.io;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.util.ArrayList;
import java.util.List;
import net.zbin.core.CompensationSource;
import net.zbin.core.Grading;
import net.zbin.core.Impedance;

/**
 * The readings of a test plan's later steps, as the decision payload's {@code steps} array and the record log's
 * {@code steps} cell (the same JSON, compact): {@code [{"step", "freq_hz", "r_ohm", "x_ohm", "raw_r_ohm", "raw_x_ohm",
 * "comp"}]} — R/X compensated at the step's frequency (null when the reading was not clean), raw as read.
 */
public final class StepsJson {
    private StepsJson() {}

    /** The array, or null for a decision of a one-step plan. */
    public static ArrayNode encode(List<Grading.StepReading> steps) {
        if (steps.isEmpty()) return null;
        ArrayNode a = Json.mapper().createArrayNode();
        for (Grading.StepReading s : steps) {
            ObjectNode o = a.addObject();
            Grading.Measurement m = s.measured();
            o.put("step", s.step());
            Json.num(o, "freq_hz", m.freqHz());
            Json.num(o, "r_ohm", m.z() == null ? Double.NaN : m.z().rOhm());
            Json.num(o, "x_ohm", m.z() == null ? Double.NaN : m.z().xOhm());
            Json.num(o, "raw_r_ohm", m.rawROhm());
            Json.num(o, "raw_x_ohm", m.rawXOhm());
            o.put("comp", m.comp().key());
        }
        return a;
    }

    /** Reads a record-log cell back; empty for an empty cell. Throws IllegalArgumentException naming what is wrong. */
    public static List<Grading.StepReading> decode(String cell) {
        if (cell == null || cell.isBlank()) return List.of();
        JsonNode a;
        try {
            a = Json.mapper().readTree(cell);
        } catch (JsonProcessingException e) {
            throw new IllegalArgumentException("steps is not JSON: " + e.getOriginalMessage());
        }
        if (!a.isArray()) throw new IllegalArgumentException("steps must be a JSON array");
        List<Grading.StepReading> out = new ArrayList<>();
        for (JsonNode o : a) {
            String step = o.path("step").asText("");
            if (step.isEmpty()) throw new IllegalArgumentException("steps[" + out.size() + "].step is missing");
            double f = number(o, "freq_hz", out.size()), r = number(o, "r_ohm", out.size()), x = number(o, "x_ohm", out.size());
            if (!(f > 0)) throw new IllegalArgumentException("steps[" + out.size() + "].freq_hz must be > 0");
            Impedance z = Double.isFinite(r) && Double.isFinite(x) ? new Impedance(f, r, x) : null;
            out.add(new Grading.StepReading(step, new Grading.Measurement(f, z, number(o, "raw_r_ohm", out.size()), number(o, "raw_x_ohm", out.size()),
                    CompensationSource.parse(o.path("comp").asText("none")))));
        }
        return out;
    }

    private static double number(JsonNode o, String key, int i) {
        JsonNode v = o.path(key);
        if (v.isMissingNode() || v.isNull()) return Double.NaN;
        if (!v.isNumber()) throw new IllegalArgumentException("steps[" + i + "]." + key + " is not a number");
        return v.asDouble();
    }
}
