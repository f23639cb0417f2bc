package net.zbin.io;

import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The operators who may act on a line from its status page, each with a token of at least 16 characters, read from
 * a YAML file ({@code operators: {name: token}}). Only SHA-256 digests of the tokens are kept after loading, and they
 * are compared in constant time, so neither a heap dump nor response timing gives a token away.
 */
public final class Operators {
    /** A shorter token can be guessed by trying; 16 characters of a random alphabet are far beyond that. */
    public static final int MIN_TOKEN_CHARS = 16;
    private final Map<String, byte[]> digests;

    private Operators(Map<String, byte[]> digests) { this.digests = Map.copyOf(digests); }

    public static Operators load(Path file) throws ConfigException {
        SpecNode n = Yaml.read(file);
        if (!n.isMapping("operators")) throw n.error("operators", "is required: a mapping of operator name to token");
        SpecNode ops = n.child("operators");
        Map<String, byte[]> d = new LinkedHashMap<>();
        for (String name : ops.keys()) {
            if (!name.matches("[A-Za-z0-9][A-Za-z0-9._-]{0,63}"))
                throw ops.error(name, "an operator name is 1..64 letters, digits, '.', '_' or '-'");
            String t;
            try {
                t = ops.optText(name, null);
            } catch (ConfigException e) {
                t = null;
            }
            if (t == null || t.length() < MIN_TOKEN_CHARS)
                throw ops.error(name, "token must be text of at least " + MIN_TOKEN_CHARS + " characters (value not shown)");
            d.put(name, digest(t));
        }
        if (d.isEmpty()) throw n.error("operators", "names no operator");
        n.finish();
        return new Operators(d);
    }

    /** Built from name → token pairs (tests). */
    public static Operators of(Map<String, String> tokens) {
        Map<String, byte[]> d = new LinkedHashMap<>();
        tokens.forEach((k, v) -> d.put(k, digest(v)));
        return new Operators(d);
    }

    /** The operator a token belongs to, or null: every entry is compared, whatever matches first. */
    public String who(String token) {
        if (token == null || token.isEmpty()) return null;
        byte[] got = digest(token);
        String found = null;
        for (var e : digests.entrySet()) if (MessageDigest.isEqual(e.getValue(), got) && found == null) found = e.getKey();
        return found;
    }

    public int size() { return digests.size(); }

    private static byte[] digest(String token) {
        try {
            return MessageDigest.getInstance("SHA-256").digest(token.getBytes(StandardCharsets.UTF_8));
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("SHA-256 is part of every Java runtime", e);
        }
    }

    @Override
    public String toString() { return "Operators[" + String.join(", ", digests.keySet()) + "]"; }
}
