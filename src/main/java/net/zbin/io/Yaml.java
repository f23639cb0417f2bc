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

    public static SpecNode read(Path file) throws ConfigException {
        JsonNode root;
        try {
            root = MAPPER.readTree(Files.readAllBytes(file));
        } catch (NoSuchFileException e) {
            throw new ConfigException(file, null, "file not found");
        } catch (JsonProcessingException e) {
            JsonLocation loc = e.getLocation();
            String where = loc == null ? "" : "line " + loc.getLineNr();
            throw new ConfigException(file, where, "not valid YAML: " + e.getOriginalMessage());
        } catch (IOException e) {
            throw new ConfigException(file, null, "cannot read: " + e.getMessage());
        }
        if (root == null || root.isMissingNode() || root.isNull()) throw new ConfigException(file, null, "file is empty");
        return new SpecNode(file, "", root);
    }
}
