package net.zbin.app;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import net.zbin.core.Recipe;
import net.zbin.core.RecordedReading;
import net.zbin.core.Sweep;
import net.zbin.core.Tuner;
import net.zbin.io.ReadingSource;
import net.zbin.io.RecipeLoader;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code zbin tune}: every setting's counts equal a brute-force replay of that setting, exactly. */
class TuneTest {
    @TempDir
    Path dir;

    static List<RecordedReading> rows(Path f) throws Exception {
        List<RecordedReading> out = new ArrayList<>();
        try (ReadingSource s = ReadingSource.open(f, b -> { })) {
            RecordedReading r;
            while ((r = s.next()) != null) out.add(r);
        }
        return out;
    }

    static void assertLikeReplays(Recipe base, List<RecordedReading> rows, List<Sweep> sweeps) {
        Tuner tuner = new Tuner(base, sweeps, 0.3);
        rows.forEach(tuner::add);
        for (Tuner.Result r : tuner.results()) {
            if (!r.valid()) continue;
            Recipe set = base;
            for (int i = 0; i < sweeps.size(); i++) set = sweeps.get(i).apply(set, r.values().get(i));
            assertEquals(Tuner.replay(set, rows).snapshot(), r.tally(), r.label());
        }
    }

    @Test
    void randomLimitAndGuardSettings_countExactlyAsReplaysOfThem_concentric() throws Exception {
        Recipe mlcc = RecipeLoader.load(Path.of("config/recipes/mlcc-x7r-100n.yaml"));
        List<RecordedReading> rows = rows(Path.of("simulators/lots/lot-mlcc-100n.csv"));
        Random rnd = new Random(2026);
        for (int k = 0; k < 30; k++) {
            double j = 1 + rnd.nextInt(80) / 10.0, kk = j + 0.5 + rnd.nextInt(60) / 10.0;
            List<Sweep> sweeps = List.of(Sweep.parse("grade.J=" + j + "," + (j + 0.37), mlcc.partType()),
                    Sweep.parse(rnd.nextBoolean() ? "grade.K=" + kk : "guard=" + rnd.nextInt(40) / 100.0 + "," + rnd.nextInt(90) / 100.0, mlcc.partType()));
            assertLikeReplays(mlcc, rows, sweeps);
        }
        // Edges on purpose: a limit exactly at a recorded deviation.
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("guard=0", mlcc.partType()), Sweep.parse("grade.J=5,4.2,3", mlcc.partType())));
    }

    @Test
    void ladderSettings_countExactlyAsReplays() throws Exception {
        Path lot = dir.resolve("ind.csv");
        Cli w = Cli.run("sim", "lot", "--parts", "3000", "--out", lot.toString(), "--scenario", "simulators/scenarios/harrowgate-inductor-4u7.yaml");
        assertEquals(0, w.exit(), w.err());
        Recipe ind = RecipeLoader.load(Path.of("config/recipes/inductor-pwr-4u7.yaml"));
        List<RecordedReading> rows = rows(lot);
        assertLikeReplays(ind, rows, List.of(Sweep.parse("guard=0:1:0.25", ind.partType())));
        assertLikeReplays(ind, rows, List.of(Sweep.parse("grade.N.low=-9:-5:0.5", ind.partType()), Sweep.parse("grade.L-.high=-9,-7,-5", ind.partType())));
    }

    @Test
    void gateAndNominalSettings_countExactlyAsReplays() throws Exception {
        Recipe mlcc = RecipeLoader.load(Path.of("config/recipes/mlcc-x7r-100n.yaml"));
        List<RecordedReading> rows = rows(Path.of("simulators/lots/lot-mlcc-100n.csv"));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("d_max=0.015:0.035:0.0025", mlcc.partType())));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("q_min=20:60:5", mlcc.partType())));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("esr_max=10:40:2.5", mlcc.partType())));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("d_max=0.02,0.03", mlcc.partType()), Sweep.parse("grade.J=4,5", mlcc.partType())));
        assertLikeReplays(mlcc, rows, List.of(Sweep.parse("nominal=98n:102n:1n", mlcc.partType()), Sweep.parse("grade.J=4,5", mlcc.partType())));
    }

    @Test
    void theCommand_printsATable_json_csv_andRecommendsForATarget() throws Exception {
        String recipe = "config/recipes/mlcc-x7r-100n.yaml", lot = "simulators/lots/lot-mlcc-100n.csv";
        Path csv = dir.resolve("t.csv");
        Cli c = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "guard=0:1:0.25", "--target-false-accept", "0.05", "--csv", csv.toString());
        assertEquals(0, c.exit(), c.err());
        assertTrue(c.out().contains("guard=0.5") && c.out().contains("recommended: "), c.out());
        assertEquals(6, java.nio.file.Files.readAllLines(csv).size(), "header and five settings");
        JsonNode j = new ObjectMapper().readTree(Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "guard=0:1:0.25", "--json").out());
        assertEquals(5, j.path("settings").size());
        JsonNode last = j.path("settings").get(4);
        assertTrue(last.path("false_accept_pct").asDouble() <= j.path("settings").get(0).path("false_accept_pct").asDouble(),
                "a wider guard band never raises the estimated false accepts");
        Cli bad = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "grade.J=7:3:1");
        assertEquals(2, bad.exit());
        assertTrue(bad.err().contains("FROM must not be above TO"), bad.err());
        Cli unknown = Cli.run("tune", "--recipe", recipe, "--in", lot, "--vary", "colour=red");
        assertEquals(2, unknown.exit());
        assertTrue(unknown.err().contains("QUANTITY=FROM:TO:STEP"), unknown.err());
    }
}
