package net.zbin.io;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.MissingNode;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.Iterator;
import java.util.List;
import java.util.Set;
import java.util.function.Function;
import net.zbin.core.SiValue;
import net.zbin.core.Unit;

/**
 * A view of one YAML/JSON mapping that remembers its key path and which keys were read, so that a
 * loader can report "file: grades[2].bin: must be an integer" and refuse unknown keys. Jackson does
 * the parsing; this only walks the tree.
 */
public final class SpecNode {
    private final Path file;
    private final String path;
    private final JsonNode node;
    private final Set<String> seen = new HashSet<>();

    public SpecNode(Path file, String path, JsonNode node) throws ConfigException {
        this.file = file;
        this.path = path;
        this.node = node;
        if (node != null && !node.isObject())
            throw new ConfigException(file, path.isEmpty() ? "(top level)" : path, "must be a mapping of keys to values");
    }

    public Path file() { return file; }

    public String key(String k) { return path.isEmpty() ? k : path + "." + k; }

    public boolean has(String k) {
        JsonNode v = node.get(k);
        return v != null && !v.isNull();
    }

    private JsonNode get(String k) {
        seen.add(k);
        JsonNode v = node.get(k);
        return v == null || v.isNull() ? MissingNode.getInstance() : v;
    }

    /** The keys of this mapping, in file order (for mappings whose keys are names, not settings). */
    public List<String> keys() {
        List<String> out = new ArrayList<>();
        node.fieldNames().forEachRemaining(out::add);
        return out;
    }

    public ConfigException error(String k, String message) { return new ConfigException(file, key(k), message); }

    public String text(String k) throws ConfigException {
        String v = optText(k, null);
        if (v == null) throw error(k, "is required");
        return v;
    }

    public String optText(String k, String dflt) throws ConfigException {
        JsonNode v = get(k);
        if (v.isMissingNode()) return dflt;
        if (!v.isValueNode()) throw error(k, "must be a single value, not a list or mapping");
        return v.asText();
    }

    /** A number in the given unit, written plainly or with an SI prefix ("1k", "100n"); a written unit must fit. */
    public double number(String k, Unit unit) throws ConfigException {
        if (!has(k)) { get(k); throw error(k, "is required"); }
        return optNumber(k, Double.NaN, unit);
    }

    public double optNumber(String k, double dflt, Unit unit) throws ConfigException {
        JsonNode v = get(k);
        if (v.isMissingNode()) return dflt;
        double d;
        if (v.isNumber()) d = v.asDouble();
        else if (v.isTextual()) {
            try {
                d = SiValue.parse(v.asText(), unit);
            } catch (IllegalArgumentException e) {
                throw error(k, e.getMessage());
            }
        } else throw error(k, "must be a number (was " + describe(v) + ")");
        if (!Double.isFinite(d)) throw error(k, "must be a finite number (was " + v.asText() + ")");
        return d;
    }

    public Double optNumberOrNull(String k, Unit unit) throws ConfigException {
        if (!has(k)) return markNull(k);
        return optNumber(k, Double.NaN, unit);
    }

    /** Whether the value at k is a mapping (e.g. {code: 104}). */
    public boolean isMapping(String k) {
        JsonNode v = node.get(k);
        return v != null && v.isObject();
    }

    private Double markNull(String k) { seen.add(k); return null; }

    public int integer(String k) throws ConfigException {
        if (!has(k)) { get(k); throw error(k, "is required"); }
        return optInteger(k, 0);
    }

    public int optInteger(String k, int dflt) throws ConfigException {
        JsonNode v = get(k);
        if (v.isMissingNode()) return dflt;
        if (!v.isIntegralNumber() || !v.canConvertToInt()) throw error(k, "must be a whole number (was " + describe(v) + ")");
        return v.asInt();
    }

    public boolean optBool(String k, boolean dflt) throws ConfigException {
        JsonNode v = get(k);
        if (v.isMissingNode()) return dflt;
        if (!v.isBoolean()) throw error(k, "must be true or false (was " + describe(v) + ")");
        return v.asBoolean();
    }

    /** A nested mapping; an absent key gives an empty mapping. */
    public SpecNode child(String k) throws ConfigException {
        JsonNode v = get(k);
        return new SpecNode(file, key(k), v.isMissingNode() ? com.fasterxml.jackson.databind.node.JsonNodeFactory.instance.objectNode() : v);
    }

    /** Each element of a list of mappings, mapped with its own path ("grades[1]"). */
    public <T> List<T> list(String k, Mapper<T> mapper) throws ConfigException {
        JsonNode v = get(k);
        List<T> out = new ArrayList<>();
        if (v.isMissingNode()) return out;
        if (!v.isArray()) throw error(k, "must be a list");
        for (int i = 0; i < v.size(); i++) out.add(mapper.map(new SpecNode(file, key(k) + "[" + i + "]", v.get(i))));
        return out;
    }

    /** A list of plain values. */
    public <T> List<T> values(String k, Function<String, T> parse) throws ConfigException {
        JsonNode v = get(k);
        List<T> out = new ArrayList<>();
        if (v.isMissingNode()) return out;
        if (!v.isArray()) throw error(k, "must be a list");
        for (int i = 0; i < v.size(); i++) {
            try {
                out.add(parse.apply(v.get(i).asText()));
            } catch (IllegalArgumentException e) {
                throw new ConfigException(file, key(k) + "[" + i + "]", e.getMessage());
            }
        }
        return out;
    }

    /** Fails on the first key this loader did not read: a typo must not be silently ignored. */
    public void finish() throws ConfigException {
        Iterator<String> it = node.fieldNames();
        while (it.hasNext()) {
            String k = it.next();
            if (!seen.contains(k)) throw error(k, "unknown key (check spelling; known keys here: " + String.join(", ", new java.util.TreeSet<>(seen)) + ")");
        }
    }

    /** Runs a core constructor and turns its IllegalArgumentException into a ConfigException at this node. */
    public <T> T build(String k, Builder<T> b) throws ConfigException {
        try {
            return b.build();
        } catch (net.zbin.core.SpecException e) {
            throw new ConfigException(file, e.key(), e.reason());
        } catch (IllegalArgumentException e) {
            throw new ConfigException(file, k == null ? path : key(k), e.getMessage());
        }
    }

    private static String describe(JsonNode v) {
        if (v.isTextual()) return "'" + v.asText() + "'";
        if (v.isArray()) return "a list";
        if (v.isObject()) return "a mapping";
        return v.asText();
    }

    @FunctionalInterface
    public interface Mapper<T> {
        T map(SpecNode n) throws ConfigException;
    }

    @FunctionalInterface
    public interface Builder<T> {
        T build() throws ConfigException;
    }
}
