package net.zbin.app;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import net.zbin.sim.Scenario;

/** Loads a scenario named on the command line, or the built-in one. */
final class Scenarios {
    private Scenarios() {}

    static Scenario load(Path file) throws UsageException {
        if (file == null) return Scenario.builtIn();
        if (!Files.exists(file)) throw new UsageException(file + ": scenario file not found");
        try {
            return Scenario.read(file);
        } catch (IllegalArgumentException e) {
            throw new UsageException(e.getMessage());
        } catch (IOException e) {
            throw new UsageException(file + ": cannot read: " + e.getMessage());
        }
    }
}
