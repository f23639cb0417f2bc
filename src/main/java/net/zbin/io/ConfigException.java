package net.zbin.io;

import java.nio.file.Path;

/**
 * A file that cannot be used as given: names the file, the key path (or line) and what is wrong.
 * The command line turns it into exit code 2.
 */
public final class ConfigException extends Exception {
    private final String file;
    private final String key;

    public ConfigException(Path file, String key, String message) {
        this(file == null ? "<input>" : file.toString(), key, message, null);
    }

    public ConfigException(String file, String key, String message, Throwable cause) {
        super(file + (key == null || key.isEmpty() ? "" : ": " + key) + ": " + message, cause);
        this.file = file;
        this.key = key;
    }

    public String file() { return file; }

    public String key() { return key; }
}
