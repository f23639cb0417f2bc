package net.zbin.app;

import java.nio.file.Files;
import java.nio.file.Path;

/** Where the packaged jar is, for tests that start the real program as a process. */
public final class Jar {
    private Jar() {}

    public static String path() {
        String env = System.getenv("ZBIN_JAR");
        Path p = Path.of(env != null ? env : "target/zbin.jar").toAbsolutePath();
        if (!Files.exists(p)) throw new IllegalStateException("the jar " + p + " is not built (run mvn package first)");
        return p.toString();
    }
}
