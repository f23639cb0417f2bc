package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code zbin sim lot} answers "what if" without editing a scenario: spread, offset, a drifting fixture, a noisier meter. */
class SimLotWhatIfTest {
    static final String RECIPE = "config/recipes/mlcc-c0g-100p.yaml", SCENARIO = "simulators/scenarios/harrowgate-c0g-100p-stable.yaml";

    @TempDir
    Path dir;

    JsonNode lot(String name, String... extra) throws Exception {
        Path f = dir.resolve(name + ".csv");
        String[] args = new String[] {"sim", "lot", "--parts", "4000", "--scenario", SCENARIO, "--out", f.toString()};
        String[] all = java.util.Arrays.copyOf(args, args.length + extra.length);
        System.arraycopy(extra, 0, all, args.length, extra.length);
        Cli w = Cli.run(all);
        assertEquals(0, w.exit(), w.err());
        Cli r = Cli.run("replay", "--recipe", RECIPE, "--in", f.toString(), "--json", "--quiet");
        assertEquals(0, r.exit(), r.err());
        return new ObjectMapper().readTree(r.out()).path("monitor");
    }

    @Test
    void whatIfs_changeTheLotAsAsked() throws Exception {
        JsonNode base = lot("base");
        JsonNode wide = lot("wide", "--spread-x", "2");
        double ratio = wide.path("dev_sigma_pct").asDouble() / base.path("dev_sigma_pct").asDouble();
        assertTrue(ratio > 1.8 && ratio < 2.2, "spread doubled: " + ratio);
        JsonNode shifted = lot("shifted", "--offset-pct", "1.0");
        assertEquals(1.0, shifted.path("dev_mean_pct").asDouble() - base.path("dev_mean_pct").asDouble() + 0.1, 0.15, "offset moved to +1 %");
        // 4 000 parts at 0.9 s each = 1 h; 0.5 pF of stray an hour on 100 pF moves the late parts by about +0.5 %.
        JsonNode drift = lot("drift", "--stray-drift", "0.5p", "--seconds-per-part", "0.9");
        assertTrue(drift.path("dev_mean_pct").asDouble() > base.path("dev_mean_pct").asDouble() + 0.15, drift.toString());
        JsonNode noisy = lot("noisy", "--noise-x", "20");
        assertTrue(noisy.path("dev_sigma_pct").asDouble() > base.path("dev_sigma_pct").asDouble(), "a noisier meter widens the spread");
        assertEquals(2, Cli.run("sim", "lot", "--parts", "10", "--out", dir.resolve("x.csv").toString(), "--spread-x", "-1").exit());
    }
}
