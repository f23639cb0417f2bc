package net.zbin.app;

import java.nio.file.Path;
import net.zbin.sim.Scenario;
import picocli.CommandLine.Option;

/** The options every simulated-lot command shares: how many parts, drawn from which scenario. */
final class LotOptions {
    @Option(names = "--parts", defaultValue = "1000", paramLabel = "N", description = "parts in the lot (default ${DEFAULT-VALUE})")
    long parts;
    @Option(names = "--scenario", paramLabel = "FILE", description = "scenario file (default: the built-in Harrowgate MLCC lot)")
    Path scenarioFile;

    /** The scenario, after checking the part count. */
    Scenario scenario() throws UsageException {
        if (parts < 1) throw new UsageException("--parts must be >= 1 (was " + parts + ")");
        return Scenarios.load(scenarioFile);
    }
}
