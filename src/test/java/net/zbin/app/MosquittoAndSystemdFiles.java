package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

/**
 * Checks for the broker and service files shipped in config/. The Mosquitto files are also run
 * in a real broker by {@link BrokerAclIT}; here they are checked for what zbin relies on.
 */
final class MosquittoAndSystemdFiles {
    private MosquittoAndSystemdFiles() {}

    static void check(Path p) throws Exception {
        List<String> lines = Files.readAllLines(p).stream().map(String::strip).filter(l -> !l.isEmpty() && !l.startsWith("#")).toList();
        String name = p.getFileName().toString();
        switch (name) {
            case "zbin.conf" -> {
                for (String d : List.of("set_tcp_nodelay true", "allow_anonymous false", "message_size_limit 65536"))
                    assertTrue(lines.contains(d), name + " must say '" + d + "'");
                assertTrue(lines.stream().anyMatch(l -> l.startsWith("acl_file ")), name + " names an acl_file");
                assertTrue(lines.stream().anyMatch(l -> l.startsWith("password_file ")), name + " names a password_file");
            }
            case "zbin.acl" -> {
                for (String u : List.of("zbin-hg-line-2", "handler-hg-line-2", "operator", "engineer"))
                    assertTrue(lines.contains("user " + u), name + " has user " + u);
                assertTrue(lines.stream().allMatch(l -> l.startsWith("user ") || l.startsWith("topic ")), name + ": only user/topic lines");
            }
            case "zbin@.service" -> {
                for (String s : List.of("[Unit]", "[Service]", "[Install]")) assertTrue(lines.contains(s), name + " has " + s);
                assertTrue(lines.stream().anyMatch(l -> l.startsWith("ExecStart=") && l.contains("zbin.jar run --config")), name + " runs zbin run");
                assertTrue(lines.contains("KillSignal=SIGTERM"), name + " stops with SIGTERM (clean offline)");
                assertTrue(lines.stream().anyMatch(l -> l.startsWith("ExecStart=") && l.contains("-XX:+ExitOnOutOfMemoryError")),
                        name + " ends the process on out of memory");
                assertTrue(unitJvmOptions(p).contains("-Xmx256m"), name + " bounds the heap (FreshStartBench starts its daemons with the unit's options)");
                for (String l : lines) {
                    if (!l.startsWith("ExecStart") || !l.contains("/bin/sh -c")) continue;
                    assertTrue(l.startsWith("ExecStartPre=") || l.contains("exec /usr/bin/java"), name + ": the shell hands over to the JVM, so SIGTERM reaches zbin: " + l);
                    assertTrue(!l.replace("$$", "").contains("$"), name + ": a shell variable is written $$ (systemd expands a single $ itself): " + l);
                }
            }
            default -> throw new AssertionError("no check for " + p);
        }
    }

    private static final java.util.regex.Pattern JAVA_OPTIONS = java.util.regex.Pattern.compile("exec /usr/bin/java (.*?) \"\\$\\$cds\"");

    /**
     * The options the unit's {@code ExecStart} gives {@code java} before its class-data option and the jar (e.g.
     * {@code -Xmx256m}): what a process started "the unit's way" ({@link FreshStartBench}) runs with.
     */
    static List<String> unitJvmOptions(Path unit) throws java.io.IOException {
        for (String l : Files.readAllLines(unit)) {
            var m = JAVA_OPTIONS.matcher(l);
            if (l.startsWith("ExecStart=") && m.find()) return List.of(m.group(1).trim().split("\\s+"));
        }
        throw new AssertionError(unit + ": no ExecStart= line with 'exec /usr/bin/java <options> \"$$cds\"'");
    }
}
