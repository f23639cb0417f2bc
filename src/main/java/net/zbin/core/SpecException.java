package net.zbin.core;

/**
 * A specification (recipe, profile, config) that is self-contradictory or out of range. Carries
 * the key path as written in the file ({@code grades[1].low_pct}) so the loader can name file and key.
 */
public final class SpecException extends IllegalArgumentException {
    private final String key;

    public SpecException(String key, String message) {
        super(key + ": " + message);
        this.key = key;
    }

    public String key() { return key; }

    /** The message without the key prefix. */
    public String reason() { return getMessage().substring(key.length() + 2); }
}
