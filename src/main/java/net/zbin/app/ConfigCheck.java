package net.zbin.app;

import java.io.PrintWriter;
import java.nio.file.Path;

/** Prints a validated line config. Filled in with the daemon's config loader. */
final class ConfigCheck {
    private ConfigCheck() {}

    static int print(PrintWriter out, Path config) throws UsageException {
        throw new UsageException("--config: line configs arrive with the daemon; use --recipe for now");
    }
}
