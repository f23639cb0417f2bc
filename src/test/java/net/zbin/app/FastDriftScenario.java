package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.IOException;
import java.nio.file.Path;
import net.zbin.io.Yaml;

/**
 * The shipped drifting-fixture scenario for a demo whose simulated meter answers at once ({@code --time-scale 0}):
 * its 12 000 parts then take about 25 s instead of a minute, and the fixture's drift, which runs on the wall clock, is
 * made four times as fast (2 pF a minute) so that it crosses the same limits within the lot.
 */
final class FastDriftScenario {
    static final Path SHIPPED = Path.of("simulators/scenarios/harrowgate-c0g-100p-stray-drift.yaml");

    private FastDriftScenario() {}

    /** Writes the copy into {@code dir} and returns its path. */
    static Path write(Path dir) throws IOException {
        ObjectNode sc = (ObjectNode) Yaml.mapper().readTree(SHIPPED.toFile());
        ObjectNode fixture = (ObjectNode) sc.path("fixture");
        assertTrue(fixture.path("drift_per_hour").asText().equals("30p"), "the shipped scenario drifts 30 pF an hour: " + fixture);
        fixture.put("drift_per_hour", "120p");
        String description = sc.path("description").asText();
        assertTrue(description.contains("about 0.5 pF a minute"), description);
        sc.put("description", description.replace("about 0.5 pF a minute", "about 2 pF a minute"));
        Path copy = dir.resolve("stray-drift-2pf-a-minute.yaml");
        Yaml.mapper().writeValue(copy.toFile(), sc);
        return copy;
    }
}
