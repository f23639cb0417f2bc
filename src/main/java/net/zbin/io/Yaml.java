package net.zbin.io;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonLocation;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;

/** Reads a YAML file into a tree, with syntax errors reported by file and line. */
public final class Yaml {
    /** A key written twice in one mapping is refused, not silently overwritten by the second. */
    private static final ObjectMapper MAPPER = new ObjectMapper(new YAMLFactory())
            .enable(com.fasterxml.jackson.databind.DeserializationFeature.FAIL_ON_READING_DUP_TREE_KEY);

    private Yaml() {}

    public static ObjectMapper mapper() { return MAPPER; }

    /**
     * A syntax error at the line the YAML parser itself names (its problem mark), in one line of text;
     * a duplicate key named as such.
     */
    static ConfigException syntaxError(Path file, JsonProcessingException e) {
        for (Throwable t = e; t != null; t = t.getCause()) {
            if (t instanceof org.yaml.snakeyaml.error.MarkedYAMLException m && m.getProblemMark() != null) {
                String what = m.getProblem() + (m.getContext() != null ? " (" + m.getContext() + ")" : "");
                return new ConfigException(file, "line " + (m.getProblemMark().getLine() + 1),
                        "not valid YAML: " + what.replaceAll("\\s+", " "));
            }
        }
        JsonLocation loc = e.getLocation();
        String where = loc == null ? "" : "line " + loc.getLineNr();
        String msg = e.getOriginalMessage();
        java.util.regex.Matcher dup = java.util.regex.Pattern.compile("Duplicate field '([^']*)'").matcher(msg);
        if (dup.find()) return new ConfigException(file, where, "key '" + dup.group(1) + "' is given twice in one mapping; keep one");
        return new ConfigException(file, where, "not valid YAML: " + msg.replaceAll("\\s+", " "));
    }

    public static SpecNode read(Path file) throws ConfigException {
        JsonNode root;
        try {
            root = MAPPER.readTree(Files.readAllBytes(file));
        } catch (NoSuchFileException e) {
            throw new ConfigException(file, null, "file not found");
        } catch (JsonProcessingException e) {
            throw syntaxError(file, e);
        } catch (IOException e) {
            throw new ConfigException(file, null, "cannot read: " + e.getMessage());
        }
        if (root == null || root.isMissingNode() || root.isNull()) throw new ConfigException(file, null, "file is empty");
        return new SpecNode(file, "", root);
    }
}
