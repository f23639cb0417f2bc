package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;
import net.zbin.io.LineConfigLoader;
import net.zbin.io.RecipeLoader;
import net.zbin.io.meter.MeterProfileLoader;
import net.zbin.sim.Scenario;
import org.junit.jupiter.api.Test;

/** Every shipped file in config/ and simulators/scenarios/ loads; a new kind of file must be added here. */
class ConfigFilesTest {
    @Test
    void everyFileInConfig_loads() throws Exception {
        List<Path> files;
        try (Stream<Path> s = Files.walk(Path.of("config"))) {
            files = s.filter(Files::isRegularFile).sorted().toList();
        }
        assertFalse(files.isEmpty());
        for (Path p : files) {
            String rel = Path.of("config").relativize(p).toString().replace('\\', '/');
            if (rel.startsWith("recipes/")) RecipeLoader.load(p);
            else if (rel.startsWith("meters/")) MeterProfileLoader.load(p);
            else if (rel.equals("line.yaml")) LineConfigLoader.load(p);
            else if (rel.startsWith("mosquitto/") || rel.startsWith("systemd/")) MosquittoAndSystemdFiles.check(p);
            else if (rel.equals("operators.example.yaml")) net.zbin.io.Operators.load(p);
            else if (rel.equals("historian/historian.yaml")) net.zbin.io.db.HistorianConfig.load(p, false);
            else if (rel.equals("historian/roles.sql")) assertTrue(Files.readString(p).contains("CREATE ROLE zbin_ingest")); // HistorianIT runs it
            else if (rel.startsWith("prometheus/")) prometheusFile(p); // their metric names: StatusPageIT checks them against a scrape
            else fail("config/" + rel + " is shipped but no test loads it");
        }
    }

    @Test
    void everyScenario_loadsAndMatchesTheBuiltIn() throws Exception {
        try (Stream<Path> s = Files.list(Path.of("simulators/scenarios"))) {
            for (Path p : s.toList()) Scenario.read(p);
        }
        assertEquals(Scenario.builtIn(), Scenario.read(Path.of("simulators/scenarios/harrowgate-mlcc-100n.yaml")));
    }

    /** A Prometheus config or rule file: valid YAML with the parts Prometheus requires. */
    static void prometheusFile(Path p) throws Exception {
        var n = net.zbin.io.Yaml.mapper().readTree(p.toFile());
        if (p.getFileName().toString().contains("alerts")) {
            for (var g : n.path("groups"))
                for (var r : g.path("rules"))
                    assertTrue(r.path("alert").isTextual() && r.path("expr").isTextual(), p + ": every rule has alert and expr: " + r);
            assertTrue(n.path("groups").size() > 0, p + ": has groups");
        } else assertTrue(n.path("scrape_configs").size() > 0, p + ": has scrape_configs");
    }
}
