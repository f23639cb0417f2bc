package net.zbin.io;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermission;
import org.slf4j.LoggerFactory;

/**
 * Files that hold secrets — passwords, private keys, operator tokens — read the same way by every config: one that group
 * or others may read or write is refused, as ssh refuses such a private key, unless the config's own
 * {@code allow_open_secrets} key accepts it with a warning (a file system without POSIX modes is not checked).
 */
public final class Secrets {
    private Secrets() {}

    /**
     * @param allowKey the config key that would accept an open file, named in the refusal
     */
    public static void checkMode(Path config, String key, Path p, boolean allowed, String allowKey) throws ConfigException {
        java.util.Set<PosixFilePermission> perms;
        try {
            perms = Files.getPosixFilePermissions(p);
        } catch (UnsupportedOperationException | IOException e) {
            return;
        }
        var open = java.util.EnumSet.of(PosixFilePermission.GROUP_READ, PosixFilePermission.GROUP_WRITE, PosixFilePermission.OTHERS_READ,
                PosixFilePermission.OTHERS_WRITE);
        open.retainAll(perms);
        if (open.isEmpty()) return;
        String mode = java.nio.file.attribute.PosixFilePermissions.toString(perms);
        String why = p + " can be read or written by group or others (" + mode + "): chmod 600 it";
        if (!allowed) throw new ConfigException(config, key, why + ", or set " + allowKey + ": true to accept it with a warning");
        LoggerFactory.getLogger(Secrets.class).warn("{}: {}: {} (accepted: {} is true)", config, key, why, allowKey);
    }

    /** A password file's content (stripped), after the mode check; the content is never put into a message. */
    public static char[] password(Path config, String key, Path p, boolean allowed, String allowKey) throws ConfigException {
        checkMode(config, key, p, allowed, allowKey);
        try {
            String s = Files.readString(p, StandardCharsets.UTF_8).strip();
            if (s.isEmpty()) throw new ConfigException(config, key, "password file " + p + " is empty");
            return s.toCharArray();
        } catch (IOException e) {
            throw new ConfigException(config, key, "cannot read password file " + p);
        }
    }
}
